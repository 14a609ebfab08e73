package dev.runoff.records;

/** Wire formats of records on the topics. */
public enum Format {
    /**
     * Avro single-object encoding: {@code 0xC3 0x01}, the 8-byte little-endian CRC-64-AVRO fingerprint of the
     * writer schema, then the Avro binary body.
     */
    AVRO,
    /** UTF-8 JSON object with the schema's camelCase field names (see {@link RecordCodec}). */
    JSON;

    /** First byte of the Avro single-object header. */
    static final int MAGIC_0 = 0xC3;
    /** Second byte of the Avro single-object header (format version 1). */
    static final int MAGIC_1 = 0x01;

    /** AVRO when {@code bytes} start with {@code 0xC3 0x01}, JSON otherwise (including fewer than 2 bytes). */
    public static Format detect(byte[] bytes) {
        boolean avro = bytes.length >= 2 && (bytes[0] & 0xFF) == MAGIC_0 && (bytes[1] & 0xFF) == MAGIC_1;
        return avro ? AVRO : JSON;
    }
}
