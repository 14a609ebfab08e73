package dev.runoff.records;

import java.io.ByteArrayOutputStream;
import java.util.List;
import org.apache.avro.Schema;
import org.apache.avro.generic.GenericData;
import org.apache.avro.generic.GenericDatumReader;
import org.apache.avro.generic.GenericDatumWriter;
import org.apache.avro.io.BinaryEncoder;
import org.apache.avro.io.DecoderFactory;
import org.apache.avro.io.EncoderFactory;

/** Avro enum schema resolution for the enum evolution tests: what a reader makes of a writer's symbol. */
final class EnumResolution {
    private EnumResolution() {
    }

    /**
     * The symbol {@code reader} reads when a writer whose enum (same name) has {@code writerSymbols} and
     * {@code writerDefault} (or null) writes {@code written}.
     */
    static String read(Schema reader, List<String> writerSymbols, String writerDefault, String written)
            throws Exception {
        Schema writer = Schema.createEnum(reader.getName(), reader.getDoc(), reader.getNamespace(), writerSymbols,
                writerDefault);
        ByteArrayOutputStream bytes = new ByteArrayOutputStream();
        BinaryEncoder encoder = EncoderFactory.get().binaryEncoder(bytes, null);
        new GenericDatumWriter<Object>(writer).write(new GenericData.EnumSymbol(writer, written), encoder);
        encoder.flush();
        return new GenericDatumReader<Object>(writer, reader)
                .read(null, DecoderFactory.get().binaryDecoder(bytes.toByteArray(), null)).toString();
    }
}
