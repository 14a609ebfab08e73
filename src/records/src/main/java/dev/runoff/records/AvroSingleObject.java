package dev.runoff.records;

import java.io.ByteArrayInputStream;
import java.io.ByteArrayOutputStream;
import java.io.IOException;
import java.io.UncheckedIOException;
import java.util.List;
import org.apache.avro.Schema;
import org.apache.avro.SchemaNormalization;
import org.apache.avro.generic.GenericDatumReader;
import org.apache.avro.generic.IndexedRecord;
import org.apache.avro.io.BinaryEncoder;
import org.apache.avro.io.DatumWriter;
import org.apache.avro.io.DecoderFactory;
import org.apache.avro.io.EncoderFactory;
import org.apache.avro.message.BinaryMessageDecoder;
import org.apache.avro.message.SchemaStore;
import org.apache.avro.specific.SpecificData;
import org.apache.avro.specific.SpecificDatumWriter;

/**
 * Avro single-object encoding ({@code 0xC3 0x01}, 8-byte fingerprint, binary body) for one generated class,
 * reading older writer schemas through a {@link SchemaStore.Cache}.
 *
 * <p>Hostile input: Avro 1.12 allocates whatever a length prefix claims before reading the bytes (measured:
 * 1.5 GB allocated for a 35-byte message whose string claims 1.5 GB, 80 MB for a list claiming 20 million
 * items). So the body is first skipped with the writer schema, which checks every length against the bytes
 * really present without allocating, and reports bytes left after the record. Only then is the body
 * decoded: every string is then at most the input size, and every list holds at most one item per byte
 * (no item of these schemas encodes to zero bytes).
 *
 * <p>Writing: the header, then the body through Avro's buffered binary encoder (the same bytes as Avro's
 * {@code BinaryMessageEncoder}, whose direct encoder writes the body byte by byte into a synchronized
 * stream), with one buffer and encoder per thread. Records whose generated class has its own encoder
 * (Avro's custom coders: every record type without a union of two records) are written by it rather than by
 * the generic walk of the schema; both write the binary encoding of the Avro specification.
 *
 * @param <T> generated record class
 */
final class AvroSingleObject<T extends IndexedRecord> {

    private static final int HEADER_BYTES = 10;

    private final Schema schema;
    private final DatumWriter<T> writer;
    private final byte[] header;
    private final ThreadLocal<Output> output = ThreadLocal.withInitial(Output::new);
    private final long schemaFingerprint;
    private final SchemaStore.Cache store;
    private final BinaryMessageDecoder<T> decoder;

    AvroSingleObject(Schema schema, List<Schema> olderWriterSchemas) {
        this.schema = schema;
        SpecificData model = SpecificData.get();
        this.schemaFingerprint = SchemaNormalization.parsingFingerprint64(schema);
        this.store = new SchemaStore.Cache();
        olderWriterSchemas.forEach(store::addSchema);
        this.writer = new SpecificDatumWriter<>(schema, writingModel());
        this.header = header(schemaFingerprint);
        this.decoder = new BinaryMessageDecoder<>(model, schema, store);
    }

    byte[] encode(T record) {
        Output out = output.get();
        try {
            out.encoder = EncoderFactory.get().binaryEncoder(out.bytes, out.encoder);
            out.bytes.reset();
            out.encoder.writeFixed(header);
            writer.write(record, out.encoder);
            out.encoder.flush();
            return out.bytes.toByteArray();
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }

    /** The data model of writing: Avro's specific model with the generated classes' own encoders switched on. */
    private static SpecificData writingModel() {
        SpecificData model = new SpecificData();
        model.setCustomCoders(true);
        return model;
    }

    /** The single-object header: the two magic bytes, then the schema's fingerprint in little-endian order. */
    private static byte[] header(long fingerprint) {
        byte[] bytes = new byte[HEADER_BYTES];
        bytes[0] = (byte) 0xC3;
        bytes[1] = 0x01;
        for (int i = 2; i < HEADER_BYTES; i++) {
            bytes[i] = (byte) (fingerprint >>> (8 * (i - 2)));
        }
        return bytes;
    }

    /** One thread's output stream and the encoder writing into it (configured again on each use). */
    private static final class Output {
        private final ByteArrayOutputStream bytes = new ByteArrayOutputStream(1024);
        private BinaryEncoder encoder;
    }

    /** Decodes {@code bytes} (which start with the header); returns null after adding a problem. */
    T decode(byte[] bytes, Problems problems) {
        if (bytes.length < HEADER_BYTES) {
            problems.add(Problem.WHOLE_RECORD, Reason.MALFORMED_AVRO,
                    "avro: " + bytes.length + " bytes, shorter than the 10-byte single-object header");
            return null;
        }
        long fingerprint = fingerprint(bytes);
        Schema writer = fingerprint == schemaFingerprint ? schema : store.findByFingerprint(fingerprint);
        if (writer == null) {
            problems.add(Problem.WHOLE_RECORD, Reason.UNKNOWN_SCHEMA, String.format(
                    "avro: unknown schema fingerprint %016x; expected %016x (%s) or a registered older version",
                    fingerprint, schemaFingerprint, schema.getName()));
            return null;
        }
        try {
            int extra = bytesAfterRecord(bytes, writer);
            if (extra > 0) {
                problems.add(Problem.WHOLE_RECORD, Reason.MALFORMED_AVRO,
                        "avro: " + extra + " bytes after the end of the record");
                return null;
            }
            return decoder.decode(bytes);
        } catch (IOException | RuntimeException e) {
            // Corrupt bodies surface as EOF, Avro errors, and also as index errors (an enum or union index
            // beyond the schema): all mean the same to the caller, and none may escape to crash the job.
            problems.add(Problem.WHOLE_RECORD, Reason.MALFORMED_AVRO, "avro: truncated or corrupt body ("
                    + describe(e) + ")");
        }
        return null;
    }

    /**
     * Skips over the body with the writer schema, which checks every length prefix against the bytes that
     * are really there without allocating anything, and returns how many bytes are left after the record.
     */
    private static int bytesAfterRecord(byte[] bytes, Schema writer) throws IOException {
        ByteArrayInputStream body = new ByteArrayInputStream(bytes, HEADER_BYTES, bytes.length - HEADER_BYTES);
        GenericDatumReader.skip(writer, DecoderFactory.get().directBinaryDecoder(body, null));
        return body.available();
    }

    /** The 8-byte little-endian fingerprint after the two magic bytes. */
    private static long fingerprint(byte[] bytes) {
        long fp = 0;
        for (int i = HEADER_BYTES - 1; i >= 2; i--) {
            fp = (fp << 8) | (bytes[i] & 0xFF);
        }
        return fp;
    }

    private static String describe(Exception e) {
        Throwable root = e;
        while (root.getCause() != null && root.getCause() != root) {
            root = root.getCause();
        }
        String message = root.getMessage() == null ? "" : ": " + Problems.quote(root.getMessage());
        return root.getClass().getSimpleName() + message;
    }
}
