/**
 * An in-JVM, single-node KRaft Kafka broker for integration tests and the {@code demo} command.
 *
 * <p>{@link dev.runoff.broker.EmbeddedKafkaBroker} formats a log directory once, runs broker and
 * controller roles in one {@code kafka.server.KafkaRaftServer} on loopback ports, and keeps topics and
 * committed offsets across restarts on the same directory. It needs no Docker engine and no external
 * process.
 */
package dev.runoff.broker;
