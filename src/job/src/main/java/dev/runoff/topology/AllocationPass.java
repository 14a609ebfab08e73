package dev.runoff.topology;

import com.fasterxml.jackson.databind.ObjectMapper;
import dev.runoff.decision.Evaluator;
import dev.runoff.decision.ExperimentState;
import dev.runoff.records.RecordCodec;
import dev.runoff.records.RecordSigner;
import dev.runoff.records.avro.AllocationUpdate;
import dev.runoff.records.avro.DecisionRecord;
import java.nio.charset.StandardCharsets;
import java.util.List;
import java.util.Map;
import java.util.function.LongSupplier;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * The allocation pass over the experiments of one task, run by the {@link Fold} at each wall-clock
 * punctuation. It visits the experiments in key order and evaluates those that are due: a new experiment or
 * version; new data and the recompute period elapsed; or the heartbeat elapsed. A stopped experiment only
 * re-publishes its control record at each heartbeat.
 *
 * <p>One pass looks at most at {@link TopologySettings#allocateMaxVisits()} experiments, read {@link #PAGE} at a
 * time, does at most {@link TopologySettings#allocateMaxEvaluations()} evaluations or heartbeats, and after
 * {@link TopologySettings#allocateMaxTimeMs()} starts no new one (beyond its first) and reads no further. The
 * next pass resumes where this one stopped, and after the last experiment starts again from the first, so every
 * experiment gets its turn.
 *
 * <p>Every decision and control record is signed by the {@link RecordSigner} (the decision record after
 * sealing: its hash leaves the signature fields out, so the chain's hashes do not depend on the key).
 *
 * <p>An evaluation that throws leaves its experiment {@link ExperimentState#failed failed} (retried after new
 * data or the heartbeat) and is sent to the rejected topic with {@link RejectReason#EVALUATION_ERROR}; the
 * pass goes on with the next experiment.
 */
final class AllocationPass {

    private static final Logger LOG = LoggerFactory.getLogger(AllocationPass.class);
    private static final ObjectMapper JSON = new ObjectMapper();
    private static final long NANOS_PER_MILLI = 1_000_000L;
    /** Most experiments read from the store at a time. */
    static final int PAGE = 1_000;

    private final TopologySettings settings;
    private final Evaluator evaluator;
    private final Experiments experiments;
    private final Output output;
    private final JobCounters counters;
    private final LongSupplier nanoTime;
    private final RecordSigner signer;
    private final RecordCodec<DecisionRecord> decisions = RecordCodec.decisionRecords();
    private final RecordCodec<AllocationUpdate> updates = RecordCodec.allocationUpdates();
    private String resumeFrom;
    /** Evaluations and heartbeats of the pass under way. */
    private int work;

    /**
     * A pass reading and writing {@code experiments} and sending its records to {@code output}.
     *
     * @param settings    the budget of a pass, the Monte Carlo draws and the output format
     * @param experiments the experiments of the task
     * @param output      where decision, control and rejected records go
     * @param counters    where passes, their duration and decisions are counted
     * @param nanoTime    monotonic clock bounding the time of a pass (never used in a result)
     */
    AllocationPass(TopologySettings settings, Experiments experiments, Output output, JobCounters counters,
                   LongSupplier nanoTime) {
        this(settings, experiments, output, counters, nanoTime, RecordSigner.unsigned());
    }

    /** As above, signing every decision and control record with {@code signer}. */
    AllocationPass(TopologySettings settings, Experiments experiments, Output output, JobCounters counters,
                   LongSupplier nanoTime, RecordSigner signer) {
        this.signer = signer;
        this.settings = settings;
        this.evaluator = new Evaluator(settings.monteCarloDraws());
        this.experiments = experiments;
        this.output = output;
        this.counters = counters;
        this.nanoTime = nanoTime;
    }

    /** Runs one pass at wall-clock time {@code now} (ms since the epoch). */
    void run(long now) {
        long began = nanoTime.getAsLong();
        work = 0;
        resumeFrom = visitFrom(resumeFrom, now, began);
        counters.allocationPass(nanoTime.getAsLong() - began);
    }

    /**
     * Reads the experiments from {@code from} a page of at most {@link #PAGE} at a time and acts on the due
     * ones within the budget; returns where the next pass starts. Reading page by page keeps a pass that spends
     * its budget early from reading further than it acts, and lets the time bound stop the reading too.
     */
    private String visitFrom(String from, long now, long began) {
        int visits = 0;
        String next = from;
        do {
            Page page = experiments.page(next, Math.min(PAGE, settings.allocateMaxVisits() - visits));
            visits += page.entries().size();
            String stoppedAt = visit(page, now, began);
            if (stoppedAt != null) {
                return stoppedAt;
            }
            next = page.next();
        } while (next != null && visits < settings.allocateMaxVisits() && !outOfTime(began));
        return next;
    }

    /**
     * Acts on the due experiments of {@code page} while the budget lasts; returns the
     * experiment the budget stopped at, or {@code null} when the page is done. The first action of a pass is
     * never refused for time, so a pass whose reading alone outlasts {@link TopologySettings#allocateMaxTimeMs()}
     * (a starved machine) still moves on.
     */
    private String visit(Page page, long now, long began) {
        for (Map.Entry<String, ExperimentState> entry : page.entries()) {
            Action action = Action.of(entry.getValue(), now);
            if (action == Action.NONE) {
                continue;
            }
            if (work >= settings.allocateMaxEvaluations() || work > 0 && outOfTime(began)) {
                return entry.getKey();
            }
            work++;
            act(entry.getKey(), entry.getValue(), action, now);
        }
        return null;
    }

    private boolean outOfTime(long began) {
        return nanoTime.getAsLong() - began >= settings.allocateMaxTimeMs() * NANOS_PER_MILLI;
    }

    private void act(String id, ExperimentState state, Action action, long now) {
        try {
            if (action == Action.HEARTBEAT) {
                heartbeat(id, state, now);
            } else {
                evaluate(id, state, now);
            }
        } catch (RuntimeException e) {
            fail(id, state, now, e);
        }
    }

    private void heartbeat(String id, ExperimentState state, long now) {
        Evaluator.Republished republished = evaluator.heartbeat(state, now);
        byte[] update = updates.encode(signer.sign(republished.update()), settings.outputFormat());
        experiments.put(id, republished.next());
        output.control(id, update, now);
    }

    private void evaluate(String id, ExperimentState state, long now) {
        Evaluator.Result result = evaluator.evaluate(state, now);
        byte[] decision = decisions.encode(signer.sign(result.decision()), settings.outputFormat());
        byte[] update = updates.encode(signer.sign(result.update()), settings.outputFormat());
        experiments.put(id, result.next());
        output.decision(id, decision, now);
        output.control(id, update, now);
        counters.decision();
    }

    private void fail(String id, ExperimentState state, long now, RuntimeException e) {
        long version = state.definition().getVersion();
        LOG.warn("Evaluation of experiment {} (version {}) failed; retried after new data or the heartbeat", id,
                version, e);
        experiments.put(id, state.failed(now));
        String body = JSON.createObjectNode().put("experimentId", id).put("definitionVersion", version)
                .put("error", String.valueOf(e)).toString();
        output.rejected(id, body.getBytes(StandardCharsets.UTF_8), now, RejectReason.EVALUATION_ERROR,
                "evaluation: " + e);
    }

    /** The experiments of a task as the pass reads and writes them. */
    interface Experiments {

        /**
         * At most {@code limit} experiments in key order, starting at {@code from} (from the first when
         * {@code null}), and the key of the experiment after them ({@code null} when there is none).
         */
        Page page(String from, int limit);

        /** Replaces the state of experiment {@code id}. */
        void put(String id, ExperimentState state);
    }

    /**
     * Experiments read by one pass.
     *
     * @param entries the experiments by id, in key order
     * @param next    the id of the experiment after them, or {@code null} when there is none
     */
    record Page(List<Map.Entry<String, ExperimentState>> entries, String next) {

        /** Copies the entries. */
        Page {
            entries = List.copyOf(entries);
        }
    }

    /** Where the pass sends its records, each keyed by its experiment id. */
    interface Output {

        /** An encoded decision record, for the decisions topic. */
        void decision(String id, byte[] record, long timestamp);

        /** An encoded control record, for the allocations topic. */
        void control(String id, byte[] record, long timestamp);

        /** A JSON {@code body} set aside for the rejected topic, with its reason and a readable message. */
        void rejected(String id, byte[] body, long timestamp, RejectReason reason, String message);
    }

    /** What the pass does for one experiment. */
    private enum Action {
        NONE,
        EVALUATE,
        HEARTBEAT;

        static Action of(ExperimentState state, long now) {
            long heartbeat = state.definition().getHeartbeatMs();
            if (state.stopped()) {
                return since(state.lastPublishedAt(), now) >= heartbeat ? HEARTBEAT : NONE;
            }
            boolean recompute = state.dirty()
                    && since(state.lastComputedAt(), now) >= state.definition().getRecomputePeriodMs();
            return state.due() || recompute || since(state.lastPublishedAt(), now) >= heartbeat ? EVALUATE : NONE;
        }

        private static long since(long then, long now) {
            return then < 0 ? Long.MAX_VALUE : now - then;
        }
    }
}
