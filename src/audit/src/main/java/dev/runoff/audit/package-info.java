/**
 * Auditing of decision records: reading them back from the decisions topic or an exported JSON-lines file,
 * verifying each experiment's hash chain, sequence numbers, recomputation and stopping decisions, checking
 * that the observed exposure shares followed the published weights (sample-ratio check), and rendering an
 * experiment's timeline as text, CSV, JSON and an SVG chart.
 *
 * <p>Entry points: {@link dev.runoff.audit.Verifier} (checks), {@link dev.runoff.audit.FileSource} and
 * {@link dev.runoff.audit.TopicSource} (reading), {@link dev.runoff.audit.Timeline} and
 * {@link dev.runoff.audit.SvgChart} (reports). No class here reads a clock or a global random generator.
 */
package dev.runoff.audit;
