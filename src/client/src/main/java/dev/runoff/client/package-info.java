/**
 * The client library serving tiers embed to follow the job's weights and report what they served. It
 * depends on kafka-clients (never Kafka Streams) and on the project's record schemas.
 *
 * <ul>
 *   <li>{@link dev.runoff.client.AllocationTable}: the latest control record per experiment, in memory,
 *       and {@code pick(experimentId, unitKey)}: lock-free, allocation-free, never throws, sticky per unit
 *       across weight changes; {@code assign} returns the same choice as an
 *       {@link dev.runoff.client.ArmAssignment} for the reporter.</li>
 *   <li>{@link dev.runoff.client.StickyAssigner}: in front of the table, keeps a returning unit on the arm
 *       it was served as long as that arm has weight (a bounded memory of the arm served per unit).</li>
 *   <li>{@link dev.runoff.client.ControlTopicFollower}: reads the compacted control topic from the
 *       beginning with manual assignment (no consumer group), waits at start until caught up, then follows
 *       it on a background thread.</li>
 *   <li>{@link dev.runoff.client.PickPolicy}: default arm, hashed or random assignment, the fallback for
 *       stale weights ({@link dev.runoff.client.StaleFallback}) and the behaviour after STOP
 *       ({@link dev.runoff.client.StoppedPick}).</li>
 *   <li>{@link dev.runoff.client.OutcomeReporter}: writes exposure (and click, conversion, value) events
 *       in the job's schema, each with the arm the unit was served, with the unit id replaced by a keyed hash
 *       ({@link dev.runoff.client.UnitPseudonymizer}).</li>
 *   <li>{@link dev.runoff.client.ServingMetrics}: counters of picks, fallbacks and skipped records.</li>
 * </ul>
 *
 * <p>Two hashes, two purposes: {@link dev.runoff.client.UnitHash} (SplitMix64 mixing, fast, public,
 * in-process only) turns a unit key into stable per-arm numbers for deterministic picks; the
 * {@link dev.runoff.client.UnitPseudonymizer} (HMAC-SHA-256 under a secret key) protects the unit id in
 * everything that leaves the process.
 */
package dev.runoff.client;
