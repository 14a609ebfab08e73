package dev.runoff.job;

import java.util.List;

/** The answer to "what is the state of experiment X" from one instance of the job. */
public sealed interface Lookup {

    /**
     * This instance holds the experiment.
     *
     * @param json the state as a JSON object
     */
    record Found(String json) implements Lookup {
    }

    /**
     * Another instance holds it.
     *
     * @param activeHost   {@code host:port} of the instance that holds it (its {@code application.server})
     * @param standbyHosts instances with a standby copy, possibly stale
     */
    record Elsewhere(String activeHost, List<String> standbyHosts) implements Lookup {
    }

    /** No instance holds an experiment of that id. */
    record NotFound() implements Lookup {
    }

    /**
     * The question cannot be answered now (the job is starting, rebalancing or restoring).
     *
     * @param reason why, for the reply
     */
    record Unavailable(String reason) implements Lookup {
    }
}
