package dev.runoff.records;

import static org.junit.jupiter.api.Assertions.assertEquals;

import dev.runoff.records.avro.StoppingRule;
import java.io.ByteArrayOutputStream;
import java.util.ArrayList;
import java.util.List;
import org.apache.avro.Schema;
import org.apache.avro.generic.GenericData;
import org.apache.avro.generic.GenericDatumReader;
import org.apache.avro.generic.GenericDatumWriter;
import org.apache.avro.io.BinaryEncoder;
import org.apache.avro.io.DecoderFactory;
import org.apache.avro.io.EncoderFactory;
import org.junit.jupiter.api.Test;

/**
 * The StoppingRule enum evolves by adding symbols at the end, with an enum default. Avro's schema resolution
 * (Avro specification, "Schema Resolution", enums: if the writer's symbol is not in the reader's enum and the
 * reader has a default, the default is used) lets a reader with this schema read a symbol it does not know.
 */
class StoppingRuleEvolutionTest {

    @Test
    void newSymbolsAreAtTheEndAndTheEnumHasADefault() {
        Schema schema = StoppingRule.getClassSchema();
        assertEquals(List.of("GLR", "POSTERIOR", "INDIFFERENCE", "GLR_HEURISTIC", "MIXTURE"), schema.getEnumSymbols());
        assertEquals("GLR", schema.getEnumDefault());
    }

    @Test
    void aSymbolFromANewerWriterResolvesToTheDefault() throws Exception {
        Schema reader = StoppingRule.getClassSchema();
        List<String> symbols = new ArrayList<>(reader.getEnumSymbols());
        symbols.add("SOME_LATER_RULE");
        Schema writer = Schema.createEnum(reader.getName(), reader.getDoc(), reader.getNamespace(), symbols, "GLR");
        ByteArrayOutputStream bytes = new ByteArrayOutputStream();
        BinaryEncoder encoder = EncoderFactory.get().binaryEncoder(bytes, null);
        new GenericDatumWriter<Object>(writer).write(new GenericData.EnumSymbol(writer, "SOME_LATER_RULE"), encoder);
        encoder.flush();
        Object read = new GenericDatumReader<Object>(writer, reader)
                .read(null, DecoderFactory.get().binaryDecoder(bytes.toByteArray(), null));
        assertEquals("GLR", read.toString());
    }

    @Test
    void aWriterWithTheOldSymbolsIsReadUnchanged() throws Exception {
        Schema reader = StoppingRule.getClassSchema();
        Schema writer = Schema.createEnum(reader.getName(), null, reader.getNamespace(),
                List.of("GLR", "POSTERIOR", "INDIFFERENCE"));
        ByteArrayOutputStream bytes = new ByteArrayOutputStream();
        BinaryEncoder encoder = EncoderFactory.get().binaryEncoder(bytes, null);
        new GenericDatumWriter<Object>(writer).write(new GenericData.EnumSymbol(writer, "INDIFFERENCE"), encoder);
        encoder.flush();
        Object read = new GenericDatumReader<Object>(writer, reader)
                .read(null, DecoderFactory.get().binaryDecoder(bytes.toByteArray(), null));
        assertEquals("INDIFFERENCE", read.toString());
    }
}
