package dev.runoff.records;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.records.avro.AllocationUpdate;
import dev.runoff.records.avro.DecisionRecord;
import java.security.NoSuchAlgorithmException;
import java.security.SecureRandom;
import java.util.List;
import org.junit.jupiter.api.Test;

class RecordSignaturesTest {

    private static final Ed25519.Pair KEY = Ed25519.generate("job-1", seeded(1));
    private static final SignatureVerifier TRUSTED = SignatureVerifier.of(List.of(KEY.verification()));

    static SecureRandom seeded(long seed) {
        try {
            SecureRandom random = SecureRandom.getInstance("SHA1PRNG");
            random.setSeed(seed);
            return random;
        } catch (NoSuchAlgorithmException e) {
            throw new IllegalStateException(e);
        }
    }

    @Test
    void signedDecisionVerifiesKeepsItsHashAndPassesTheCodec() {
        DecisionRecord sealed = Samples.decision();
        DecisionRecord signed = RecordSignatures.sign(sealed, KEY.signing());
        assertEquals("job-1", signed.getKeyId());
        assertEquals(88, signed.getSignature().length(), "64 bytes in padded base64 (RFC 8032 section 5.1.6)");
        assertEquals(sealed.getHash(), HashChain.hashOf(signed), "the hash leaves the signature fields out");
        assertTrue(HashChain.firstBreak(List.of(signed), sealed.getPreviousHash()).isEmpty());
        assertEquals(SignatureVerifier.Status.VALID, TRUSTED.check(signed).status());
        RecordCodec<DecisionRecord> codec = RecordCodec.decisionRecords();
        assertEquals(signed, codec.decode(codec.encode(signed), Samples.NOW).orThrow());
        assertEquals(signed, codec.decode(codec.encode(signed, Format.JSON), Samples.NOW).orThrow());
    }

    @Test
    void signingIsDeterministic() {
        // Ed25519 signatures are deterministic (RFC 8032 section 5.1.6): same key, same message, same signature
        assertEquals(RecordSignatures.sign(Samples.update(), KEY.signing()).getSignature(),
                RecordSignatures.sign(Samples.update(), KEY.signing()).getSignature());
    }

    @Test
    void anyChangeAfterSigningFailsAndNamesTheKey() {
        AllocationUpdate signed = RecordSignatures.sign(Samples.update(), KEY.signing());
        AllocationUpdate changed = AllocationUpdate.newBuilder(signed).setValidUntil(signed.getValidUntil() + 1).build();
        SignatureVerifier.Outcome outcome = TRUSTED.check(changed);
        assertEquals(SignatureVerifier.Status.BAD_SIGNATURE, outcome.status());
        assertTrue(outcome.message().contains("'job-1'"), outcome.message());
        AllocationUpdate renamed = AllocationUpdate.newBuilder(signed).setKeyId("job-2").build();
        assertEquals(SignatureVerifier.Status.UNKNOWN_KEY, TRUSTED.check(renamed).status());
        assertTrue(TRUSTED.check(renamed).message().contains("'job-2'"));
        assertEquals(SignatureVerifier.Status.UNSIGNED, TRUSTED.check(Samples.update()).status());
    }

    @Test
    void aKeyWithTheSameIdButOtherBitsDoesNotVerify() {
        Ed25519.Pair impostor = Ed25519.generate("job-1", seeded(2));
        assertEquals(SignatureVerifier.Status.BAD_SIGNATURE,
                TRUSTED.check(RecordSignatures.sign(Samples.update(), impostor.signing())).status());
    }

    @Test
    void resealingDropsTheSignature() {
        DecisionRecord signed = RecordSignatures.sign(Samples.decision(), KEY.signing());
        DecisionRecord resealed = HashChain.seal(signed, signed.getPreviousHash());
        assertEquals(null, resealed.getSignature());
        assertEquals(null, resealed.getKeyId());
    }

    @Test
    void pemRoundTripsBothHalvesWithTheKeyId() {
        VerificationKey read = Pem.readPublic(Pem.write(KEY.verification()), "pub.pem", null);
        assertEquals(KEY.verification(), read);
        SigningKey secret = Pem.readPrivate(Pem.write(KEY.signing()), "key.pem", null);
        assertEquals("job-1", secret.keyId());
        AllocationUpdate signed = RecordSignatures.sign(Samples.update(), secret);
        assertEquals(SignatureVerifier.Status.VALID, SignatureVerifier.of(List.of(read)).check(signed).status());
        assertEquals("other", Pem.readPublic(Pem.write(KEY.verification()), "pub.pem", "other").keyId());
    }

    @Test
    void badPemAndKeyIdsAreRejectedNamingTheSource() {
        String noId = Pem.write(KEY.verification()).replaceFirst("Key-Id: job-1\n", "");
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> Pem.readPublic(noId, "pub.pem", null));
        assertTrue(e.getMessage().startsWith("pub.pem: no 'Key-Id: ID' line"), e.getMessage());
        e = assertThrows(IllegalArgumentException.class, () -> Pem.readPublic("hello", "pub.pem", "k"));
        assertTrue(e.getMessage().contains("no -----BEGIN PUBLIC KEY-----"), e.getMessage());
        e = assertThrows(IllegalArgumentException.class,
                () -> Pem.readPrivate(Pem.write(KEY.verification()), "key.pem", "k"));
        assertTrue(e.getMessage().contains("PRIVATE KEY"), e.getMessage());
        e = assertThrows(IllegalArgumentException.class, () -> Ed25519.generate("a b", seeded(3)));
        assertTrue(e.getMessage().contains("'a b'"), e.getMessage());
        e = assertThrows(IllegalArgumentException.class,
                () -> SignatureVerifier.of(List.of(KEY.verification(), KEY.verification())));
        assertTrue(e.getMessage().contains("'job-1'"));
    }

    @Test
    void halfSignedOrMalformedSignatureFieldsAreRejectedByTheCodec() {
        RecordCodec<AllocationUpdate> codec = RecordCodec.allocationUpdates();
        AllocationUpdate signed = RecordSignatures.sign(Samples.update(), KEY.signing());
        assertFalse(codec.validate(AllocationUpdate.newBuilder(signed).setKeyId(null).build(), Samples.NOW).isValid());
        assertFalse(codec.validate(AllocationUpdate.newBuilder(signed).setSignature("abc").build(), Samples.NOW)
                .isValid());
        assertNotEquals(signed.getSignature(), RecordSignatures.sign(signed, Ed25519.generate("job-1", seeded(4))
                .signing()).getSignature());
    }
}
