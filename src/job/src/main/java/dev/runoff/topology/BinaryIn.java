package dev.runoff.topology;

import java.nio.charset.StandardCharsets;

/**
 * Reader of the values {@link BinaryOut} writes. The job reads only values it wrote itself; a truncated or
 * corrupt value still fails with an {@link IllegalArgumentException} naming what was being read, never with
 * a huge allocation.
 */
final class BinaryIn {

    private final byte[] bytes;
    private int pos;

    BinaryIn(byte[] bytes) {
        this.bytes = bytes;
    }

    int readByte() {
        need(1);
        return bytes[pos++] & 0xFF;
    }

    boolean readBoolean() {
        return readByte() != 0;
    }

    int readInt() {
        need(Integer.BYTES);
        int value = 0;
        for (int i = 0; i < Integer.BYTES; i++) {
            value = (value << 8) | (bytes[pos++] & 0xFF);
        }
        return value;
    }

    long readLong() {
        need(Long.BYTES);
        long value = 0;
        for (int i = 0; i < Long.BYTES; i++) {
            value = (value << 8) | (bytes[pos++] & 0xFF);
        }
        return value;
    }

    double readDouble() {
        return Double.longBitsToDouble(readLong());
    }

    byte[] readBytes() {
        int length = length();
        byte[] value = new byte[length];
        System.arraycopy(bytes, pos, value, 0, length);
        pos += length;
        return value;
    }

    byte[] readNullableBytes() {
        return readBoolean() ? readBytes() : null;
    }

    String readString() {
        int length = length();
        String value = new String(bytes, pos, length, StandardCharsets.UTF_8);
        pos += length;
        return value;
    }

    String readNullableString() {
        return readBoolean() ? readString() : null;
    }

    /** Whether bytes remain to be read. */
    boolean hasMore() {
        return pos < bytes.length;
    }

    /** Throws unless every byte was read. */
    void end() {
        if (pos < bytes.length) {
            throw new IllegalArgumentException("corrupt internal value: " + (bytes.length - pos) + " bytes left over");
        }
    }

    /** A length of bytes that follow, checked against what is left. */
    private int length() {
        int length = readInt();
        int remaining = bytes.length - pos;
        if (length < 0 || length > remaining) {
            throw new IllegalArgumentException("corrupt internal value: length " + length + " with "
                    + remaining + " bytes left");
        }
        return length;
    }

    private void need(int count) {
        if (bytes.length - pos < count) {
            throw new IllegalArgumentException("corrupt internal value: truncated");
        }
    }
}
