package dev.runoff.topology;

import java.util.function.Function;
import org.apache.kafka.common.serialization.Deserializer;
import org.apache.kafka.common.serialization.Serde;
import org.apache.kafka.common.serialization.Serializer;

/**
 * Serde of an internal value (repartition envelope or state store value) from an encoder and a decoder;
 * {@code null} stays {@code null} both ways.
 *
 * @param <T> the value type
 */
final class InternalSerde<T> implements Serde<T> {

    private final Function<T, byte[]> encode;
    private final Function<byte[], T> decode;

    InternalSerde(Function<T, byte[]> encode, Function<byte[], T> decode) {
        this.encode = encode;
        this.decode = decode;
    }

    @Override
    public Serializer<T> serializer() {
        return (topic, value) -> value == null ? null : encode.apply(value);
    }

    @Override
    public Deserializer<T> deserializer() {
        return (topic, bytes) -> bytes == null ? null : decode.apply(bytes);
    }
}
