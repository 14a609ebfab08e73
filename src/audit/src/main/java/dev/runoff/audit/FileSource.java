package dev.runoff.audit;

import java.io.BufferedReader;
import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;

/**
 * Decision records from an exported JSON-lines file: one canonical JSON decision record per line, in the
 * order they were written. Blank lines are skipped; every other line becomes an {@link Entry} positioned at
 * its 1-based line number.
 */
public final class FileSource implements DecisionSource {

    private final Path file;
    private final EntryDecoder decoder;

    /** A source reading {@code file} with {@code decoder}. */
    public FileSource(Path file, EntryDecoder decoder) {
        this.file = file;
        this.decoder = decoder;
    }

    /**
     * {@inheritDoc}
     *
     * @throws UncheckedIOException when the file cannot be read
     */
    @Override
    public List<Entry> read(String experimentId) {
        List<Entry> entries = new ArrayList<>();
        try (BufferedReader in = Files.newBufferedReader(file, StandardCharsets.UTF_8)) {
            long number = 0;
            for (String line = in.readLine(); line != null; line = in.readLine()) {
                number++;
                if (line.isBlank()) {
                    continue;
                }
                Entry entry = decoder.decode(line.getBytes(StandardCharsets.UTF_8), null, Position.line(number));
                if (experimentId == null || experimentId.equals(entry.experimentId())) {
                    entries.add(entry);
                }
            }
        } catch (IOException e) {
            throw new UncheckedIOException("cannot read " + file + ": " + e.getMessage(), e);
        }
        return entries;
    }
}
