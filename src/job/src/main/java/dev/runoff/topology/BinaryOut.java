package dev.runoff.topology;

import java.io.ByteArrayOutputStream;
import java.io.DataOutputStream;
import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.charset.StandardCharsets;

/**
 * Writer of the job's internal binary values (repartition envelopes and state store values): big-endian
 * numbers, strings as a length and UTF-8 bytes, optional values behind a presence byte.
 */
final class BinaryOut {

    private final ByteArrayOutputStream bytes = new ByteArrayOutputStream(128);
    private final DataOutputStream out = new DataOutputStream(bytes);

    BinaryOut writeByte(int value) {
        return run(() -> out.writeByte(value));
    }

    BinaryOut writeBoolean(boolean value) {
        return run(() -> out.writeBoolean(value));
    }

    BinaryOut writeInt(int value) {
        return run(() -> out.writeInt(value));
    }

    BinaryOut writeLong(long value) {
        return run(() -> out.writeLong(value));
    }

    BinaryOut writeDouble(double value) {
        return run(() -> out.writeDouble(value));
    }

    BinaryOut writeBytes(byte[] value) {
        return run(() -> {
            out.writeInt(value.length);
            out.write(value);
        });
    }

    BinaryOut writeNullableBytes(byte[] value) {
        writeBoolean(value != null);
        return value == null ? this : writeBytes(value);
    }

    BinaryOut writeString(String value) {
        return writeBytes(value.getBytes(StandardCharsets.UTF_8));
    }

    BinaryOut writeNullableString(String value) {
        writeBoolean(value != null);
        return value == null ? this : writeString(value);
    }

    byte[] toByteArray() {
        return bytes.toByteArray();
    }

    private BinaryOut run(Write write) {
        try {
            write.run();
        } catch (IOException e) {
            throw new UncheckedIOException("writing to memory failed", e);
        }
        return this;
    }

    @FunctionalInterface
    private interface Write {
        void run() throws IOException;
    }
}
