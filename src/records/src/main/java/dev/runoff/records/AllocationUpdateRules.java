package dev.runoff.records;

import dev.runoff.records.avro.AllocationUpdate;
import dev.runoff.records.avro.ArmWeight;
import dev.runoff.records.avro.ExperimentStatus;
import java.util.List;

/** Rules of {@link AllocationUpdate}: numbering, a proper weight vector, validity window, winner by status. */
final class AllocationUpdateRules implements RecordRules<AllocationUpdate> {

    @Override
    public void check(AllocationUpdate update, Limits limits, Problems problems) {
        checkNumbering(update.getExperimentId(), update.getDefinitionVersion(), update.getSequence(), problems);
        problems.atLeast("computedAt", update.getComputedAt(), 0);
        if (update.getValidUntil() <= update.getComputedAt()) {
            problems.add("validUntil", Reason.INCONSISTENT, update.getValidUntil() + " is not after computedAt "
                    + update.getComputedAt());
        }
        List<ArmWeight> weights = update.getWeights();
        List<String> arms = Names.of(weights, ArmWeight::getArm);
        problems.atLeastItems("weights", weights.size(), limits.minArms());
        problems.uniqueNames("weights", arms, ".arm");
        double sum = 0;
        for (int i = 0; i < weights.size(); i++) {
            double weight = weights.get(i).getWeight();
            problems.under("weights", i).closed("weight", weight, 0, 1);
            sum += weight;
        }
        problems.sumsToOne("weights", sum);
        checkWinner(update.getStatus() == ExperimentStatus.STOPPED, update.getWinner(), arms, problems);
        checkSignatureFields(update.getKeyId(), update.getSignature(), problems);
    }

    /**
     * keyId and signature are both null (unsigned) or both set: a key id's form and 64 bytes in padded
     * base64 (Ed25519 signatures are 64 bytes, RFC 8032 section 5.1.6). Whether the signature matches is the
     * verifier's business. Shared with decision records.
     */
    static void checkSignatureFields(String keyId, String signature, Problems problems) {
        if ((keyId == null) != (signature == null)) {
            problems.add(keyId == null ? "keyId" : "signature", Reason.INCONSISTENT,
                    "keyId and signature are set together or not at all");
            return;
        }
        if (keyId != null && !KeyIds.valid(keyId)) {
            problems.add("keyId", Reason.INCONSISTENT, KeyIds.describe(keyId));
        }
        if (signature != null && !isSignature(signature)) {
            problems.add("signature", Reason.INCONSISTENT, "must be 64 bytes in padded base64 (88 characters)");
        }
    }

    private static boolean isSignature(String text) {
        try {
            return text.length() == 88 && java.util.Base64.getDecoder().decode(text).length == 64;
        } catch (IllegalArgumentException e) {
            return false;
        }
    }

    /**
     * The experiment, definition version and sequence number that every output record carries. Shared with
     * decision records.
     */
    static void checkNumbering(String experimentId, long definitionVersion, long sequence, Problems problems) {
        problems.notBlank("experimentId", experimentId);
        problems.atLeast("definitionVersion", definitionVersion, 1);
        problems.atLeast("sequence", sequence, 1);
    }

    /**
     * A stopped experiment names its winner among the arms; a running one names none. Shared with decision
     * records, where STOP plays the part of STOPPED.
     */
    static void checkWinner(boolean stopped, String winner, List<String> arms, Problems problems) {
        if (stopped && problems.present("winner", winner) && !arms.contains(winner)) {
            problems.add("winner", Reason.INCONSISTENT, Problems.quote(winner) + " is not one of the arms");
        }
        if (!stopped && winner != null) {
            problems.add("winner", Reason.INCONSISTENT, "must be null until the experiment stops, got "
                    + Problems.quote(winner));
        }
    }
}
