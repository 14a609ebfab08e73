/**
 * The Kafka Streams job: validation, deduplication, attribution and pre-aggregation of outcome events per
 * source partition; versioning of definitions and per-experiment statistics after a repartition by
 * experiment id; a wall-clock allocation pass that runs the engine and the stopping rule and publishes
 * control records and hash-chained decision records. {@link dev.runoff.topology.RunoffTopology} builds it;
 * {@link dev.runoff.topology.TopologySettings} holds its settings; {@link dev.runoff.decision.Evaluator} is
 * the Kafka-free evaluation of one experiment.
 */
package dev.runoff.topology;

import dev.runoff.decision.Evaluator;
