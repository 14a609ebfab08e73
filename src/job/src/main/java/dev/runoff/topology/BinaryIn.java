package dev.runoff.topology;

import java.nio.BufferUnderflowException;
import java.nio.ByteBuffer;
import java.nio.charset.StandardCharsets;

/**
 * Reader of the values {@link BinaryOut} writes. The job reads only values it wrote itself; a truncated or
 * corrupt value still fails with an {@link IllegalArgumentException} naming what was being read, never with
 * a huge allocation.
 */
final class BinaryIn {

    private final ByteBuffer buffer;

    BinaryIn(byte[] bytes) {
        this.buffer = ByteBuffer.wrap(bytes);
    }

    int readByte() {
        return check(() -> buffer.get() & 0xFF);
    }

    boolean readBoolean() {
        return readByte() != 0;
    }

    int readInt() {
        return check(buffer::getInt);
    }

    long readLong() {
        return check(buffer::getLong);
    }

    double readDouble() {
        return check(buffer::getDouble);
    }

    byte[] readBytes() {
        int length = readInt();
        if (length < 0 || length > buffer.remaining()) {
            throw new IllegalArgumentException("corrupt internal value: length " + length + " with "
                    + buffer.remaining() + " bytes left");
        }
        byte[] value = new byte[length];
        buffer.get(value);
        return value;
    }

    byte[] readNullableBytes() {
        return readBoolean() ? readBytes() : null;
    }

    String readString() {
        return new String(readBytes(), StandardCharsets.UTF_8);
    }

    String readNullableString() {
        return readBoolean() ? readString() : null;
    }

    /** Throws unless every byte was read. */
    /** Whether bytes remain to be read. */
    boolean hasMore() {
        return buffer.hasRemaining();
    }

    void end() {
        if (buffer.hasRemaining()) {
            throw new IllegalArgumentException("corrupt internal value: " + buffer.remaining() + " bytes left over");
        }
    }

    private static <T> T check(java.util.function.Supplier<T> read) {
        try {
            return read.get();
        } catch (BufferUnderflowException e) {
            throw new IllegalArgumentException("corrupt internal value: truncated", e);
        }
    }
}
