/**
 * Anytime-valid guardrail tests on rates: a time-uniform confidence sequence per arm for the share of units
 * with at least one guardrail event ({@link RateSequence}), and the margin test that compares an arm with
 * its reference arm ({@link MarginCheck}). Plain Java: no Kafka, Avro or Jackson.
 */
package dev.runoff.engine.guardrail;
