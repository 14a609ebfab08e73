package dev.runoff.records;

import static org.junit.jupiter.api.Assertions.assertEquals;

import dev.runoff.records.avro.StoppingRule;
import java.util.ArrayList;
import java.util.List;
import org.apache.avro.Schema;
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
        assertEquals(List.of("GLR", "POSTERIOR", "INDIFFERENCE", "GLR_HEURISTIC", "MIXTURE", "SEQUENTIAL_T"),
                schema.getEnumSymbols());
        assertEquals("GLR", schema.getEnumDefault());
    }

    @Test
    void aSymbolFromANewerWriterResolvesToTheDefault() throws Exception {
        Schema reader = StoppingRule.getClassSchema();
        List<String> symbols = new ArrayList<>(reader.getEnumSymbols());
        symbols.add("SOME_LATER_RULE");
        assertEquals("GLR", EnumResolution.read(reader, symbols, "GLR", "SOME_LATER_RULE"));
    }

    @Test
    void aWriterWithTheOldSymbolsIsReadUnchanged() throws Exception {
        Schema reader = StoppingRule.getClassSchema();
        assertEquals("INDIFFERENCE", EnumResolution.read(reader, List.of("GLR", "POSTERIOR", "INDIFFERENCE"), null,
                "INDIFFERENCE"));
    }
}
