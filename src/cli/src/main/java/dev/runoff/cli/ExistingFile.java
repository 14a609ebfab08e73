package dev.runoff.cli;

import java.nio.file.Files;
import java.nio.file.Path;
import picocli.CommandLine.ITypeConverter;
import picocli.CommandLine.TypeConversionException;

/**
 * The converter of every option or parameter that reads a file: a missing file is {@code no such file: PATH}
 * and a directory is {@code is a directory: PATH}, both usage errors (exit code 2) before anything runs.
 */
final class ExistingFile implements ITypeConverter<Path> {

    @Override
    public Path convert(String text) {
        Path path = Path.of(text);
        String problem = problem(path);
        if (problem != null) {
            throw new TypeConversionException(problem);
        }
        return path;
    }

    /** What is wrong with reading {@code path} as a file, or {@code null} when nothing is. */
    static String problem(Path path) {
        if (Files.isDirectory(path)) {
            return "is a directory: " + path;
        }
        if (!Files.exists(path)) {
            return "no such file: " + path;
        }
        return null;
    }
}
