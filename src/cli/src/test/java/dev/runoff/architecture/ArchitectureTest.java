package dev.runoff.architecture;

import static com.tngtech.archunit.lang.syntax.ArchRuleDefinition.noClasses;
import static com.tngtech.archunit.library.Architectures.layeredArchitecture;
import static com.tngtech.archunit.library.dependencies.SlicesRuleDefinition.slices;
import static org.junit.jupiter.api.Assertions.assertTrue;

import com.tngtech.archunit.core.domain.JavaClasses;
import com.tngtech.archunit.core.importer.ClassFileImporter;
import com.tngtech.archunit.core.importer.ImportOption;
import com.tngtech.archunit.core.importer.Location;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;

/**
 * The arrows between the project's packages point down only: engine, then records, then decision, then the
 * client, the job and the audit, then the command line. Checked on the compiled main classes of every module
 * (this module's test classpath holds them all).
 */
class ArchitectureTest {

    private static final String[] KAFKA_AVRO_JACKSON = {"org.apache.kafka..", "kafka..", "org.apache.avro..",
            "com.fasterxml.jackson.."};
    private static JavaClasses main;

    @BeforeAll
    static void importMainClasses() {
        main = new ClassFileImporter()
                .withImportOption(ImportOption.Predefined.DO_NOT_INCLUDE_TESTS)
                .withImportOption(ArchitectureTest::notATestJar)
                .importPackages("dev.runoff");
    }

    private static boolean notATestJar(Location location) {
        return !location.contains("-tests.jar") && !location.contains("/testkit/") && !location.contains("runoff-testkit");
    }

    @Test
    void everyModuleIsOnTheClasspath() {
        for (String name : new String[] {"dev.runoff.engine.AllocationEngine", "dev.runoff.records.RecordCodec",
                "dev.runoff.decision.Evaluator", "dev.runoff.client.AllocationTable", "dev.runoff.broker.EmbeddedKafkaBroker",
                "dev.runoff.topology.RunoffTopology", "dev.runoff.job.StreamsJob", "dev.runoff.audit.Verifier",
                "dev.runoff.cli.Main", "dev.runoff.demo.Demo"}) {
            assertTrue(main.contain(name), name + " was not imported: the rules below would pass vacuously");
        }
    }

    @Test
    void noPackageCycles() {
        slices().matching("dev.runoff.(**)").should().beFreeOfCycles().check(main);
    }

    @Test
    void engineImportsNoKafkaAvroOrJackson() {
        noClasses().that().resideInAPackage("dev.runoff.engine..")
                .should().dependOnClassesThat().resideInAnyPackage(KAFKA_AVRO_JACKSON)
                .because("the engine is plain Java: a pure function of statistics, configuration and seed")
                .check(main);
    }

    @Test
    void decisionLogicImportsNoKafka() {
        noClasses().that().resideInAPackage("dev.runoff.decision..")
                .should().dependOnClassesThat().resideInAnyPackage("org.apache.kafka..", "kafka..")
                .because("the job, the audit and the planner share the decision logic")
                .check(main);
    }

    @Test
    void clientUsesNothingOfTheJob() {
        noClasses().that().resideInAPackage("dev.runoff.client..")
                .should().dependOnClassesThat().resideInAnyPackage("dev.runoff.topology..", "dev.runoff.job..",
                        "dev.runoff.decision..", "dev.runoff.audit..", "dev.runoff.cli..", "dev.runoff.demo..",
                        "dev.runoff.broker..", "org.apache.kafka.streams..", "kafka..")
                .because("serving tiers embed the client with kafka-clients only")
                .check(main);
    }

    @Test
    void layersPointDown() {
        layeredArchitecture().consideringOnlyDependenciesInLayers()
                .layer("engine").definedBy("dev.runoff.engine..")
                .layer("records").definedBy("dev.runoff.records..")
                .layer("decision").definedBy("dev.runoff.decision..")
                .layer("client").definedBy("dev.runoff.client..")
                .layer("broker").definedBy("dev.runoff.broker..")
                .layer("job").definedBy("dev.runoff.topology..", "dev.runoff.job..")
                .layer("audit").definedBy("dev.runoff.audit..")
                .layer("command line").definedBy("dev.runoff.cli..", "dev.runoff.demo..")
                .whereLayer("command line").mayNotBeAccessedByAnyLayer()
                .whereLayer("job").mayOnlyBeAccessedByLayers("command line")
                .whereLayer("audit").mayOnlyBeAccessedByLayers("command line")
                .whereLayer("broker").mayOnlyBeAccessedByLayers("command line")
                .whereLayer("client").mayOnlyBeAccessedByLayers("command line")
                .whereLayer("decision").mayOnlyBeAccessedByLayers("job", "audit", "command line")
                .whereLayer("records").mayOnlyBeAccessedByLayers("decision", "client", "job", "audit", "command line")
                .whereLayer("engine").mayOnlyBeAccessedByLayers("records", "decision", "client", "job", "audit",
                        "command line")
                .check(main);
    }
}
