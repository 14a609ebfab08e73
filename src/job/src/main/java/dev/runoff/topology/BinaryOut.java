package dev.runoff.topology;

import java.nio.charset.StandardCharsets;
import java.util.Arrays;

/**
 * Writer of the job's internal binary values (repartition envelopes and state store values): big-endian
 * numbers, strings as a length and UTF-8 bytes, optional values behind a presence byte. The bytes are those
 * of {@link java.io.DataOutputStream} (a double as its {@link Double#doubleToLongBits} bits), written
 * straight into a growing array.
 */
final class BinaryOut {

    private byte[] bytes = new byte[128];
    private int size;

    BinaryOut writeByte(int value) {
        ensure(1);
        bytes[size++] = (byte) value;
        return this;
    }

    BinaryOut writeBoolean(boolean value) {
        return writeByte(value ? 1 : 0);
    }

    BinaryOut writeInt(int value) {
        ensure(Integer.BYTES);
        for (int shift = 24; shift >= 0; shift -= 8) {
            bytes[size++] = (byte) (value >>> shift);
        }
        return this;
    }

    BinaryOut writeLong(long value) {
        ensure(Long.BYTES);
        for (int shift = 56; shift >= 0; shift -= 8) {
            bytes[size++] = (byte) (value >>> shift);
        }
        return this;
    }

    BinaryOut writeDouble(double value) {
        return writeLong(Double.doubleToLongBits(value));
    }

    BinaryOut writeBytes(byte[] value) {
        writeInt(value.length);
        ensure(value.length);
        System.arraycopy(value, 0, bytes, size, value.length);
        size += value.length;
        return this;
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
        return Arrays.copyOf(bytes, size);
    }

    private void ensure(int more) {
        if (size + more > bytes.length) {
            bytes = Arrays.copyOf(bytes, Math.max(bytes.length * 2, size + more));
        }
    }
}
