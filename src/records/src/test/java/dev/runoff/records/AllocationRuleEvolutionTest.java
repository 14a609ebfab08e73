package dev.runoff.records;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertSame;

import dev.runoff.records.avro.AllocationRule;
import dev.runoff.records.avro.ExperimentDefinition;
import java.util.ArrayList;
import java.util.List;
import org.apache.avro.Schema;
import org.junit.jupiter.api.Test;

/**
 * The AllocationRule enum evolves like StoppingRule: symbols are added at the end and the enum has a default,
 * so that (Avro specification, "Schema Resolution", enums) a reader with this schema reads a symbol it does
 * not know as TOP_TWO_THOMPSON.
 */
class AllocationRuleEvolutionTest {

    @Test
    void theAdaptiveRuleIsAtTheEndAndTheEnumHasADefault() {
        Schema schema = AllocationRule.getClassSchema();
        assertEquals(List.of("TOP_TWO_THOMPSON", "TOP_TWO_PROBABILITY", "TOP_TWO_VALUE", "TOP_TWO_EI", "UNIFORM",
                "TOP_TWO_ADAPTIVE"), schema.getEnumSymbols());
        assertEquals("TOP_TWO_THOMPSON", schema.getEnumDefault());
    }

    @Test
    void aSymbolFromANewerWriterResolvesToTheDefault() throws Exception {
        Schema reader = AllocationRule.getClassSchema();
        List<String> symbols = new ArrayList<>(reader.getEnumSymbols());
        symbols.add("SOME_LATER_RULE");
        assertEquals("TOP_TWO_THOMPSON", EnumResolution.read(reader, symbols, "TOP_TWO_THOMPSON", "SOME_LATER_RULE"));
    }

    @Test
    void theAdaptiveRuleIsAcceptedForBothMetrics() {
        for (ExperimentDefinition def : List.of(Samples.bernoulli(), Samples.valueMetric())) {
            def.getAllocation().setRule(AllocationRule.TOP_TWO_ADAPTIVE);
            assertSame(def, Definitions.validate(def, Samples.NOW).orThrow(), def.getMetric().getKind().name());
        }
    }
}
