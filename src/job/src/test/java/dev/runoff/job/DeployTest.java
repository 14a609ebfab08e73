package dev.runoff.job;

import dev.runoff.testkit.RepositoryFiles;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.MappingIterator;
import com.fasterxml.jackson.databind.ObjectMapper;
import com.fasterxml.jackson.dataformat.yaml.YAMLFactory;
import java.io.IOException;
import java.io.StringReader;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.Properties;
import java.util.stream.Stream;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;

/**
 * The Kubernetes manifests, the container image and its start script agree with each other and with the
 * job: every manifest parses as YAML; probes, ports and the state volume line up with the job configuration
 * in the ConfigMap; the topics Job runs {@code topics create}; the image runs the start script as a non-root
 * user.
 */
class DeployTest {

    private static final Path DEPLOY = RepositoryFiles.resolve("deploy");
    private static final ObjectMapper YAML = new ObjectMapper(new YAMLFactory());
    private static final Map<String, JsonNode> BY_KIND_AND_NAME = new HashMap<>();
    private static Properties config;

    @BeforeAll
    static void parseEveryManifest() throws IOException {
        List<Path> files;
        try (Stream<Path> s = Files.list(DEPLOY.resolve("k8s"))) {
            files = s.filter(p -> p.toString().endsWith(".yaml")).sorted().toList();
        }
        assertFalse(files.isEmpty());
        for (Path f : files) {
            try (MappingIterator<JsonNode> docs = YAML.readerFor(JsonNode.class).readValues(f.toFile())) {
                for (JsonNode doc : docs.readAll()) {
                    assertNotNull(doc.get("apiVersion"), f + ": apiVersion");
                    String key = doc.get("kind").asText() + "/" + doc.get("metadata").get("name").asText();
                    assertEquals(null, BY_KIND_AND_NAME.put(key, doc), "duplicate " + key);
                }
            }
        }
        config = new Properties();
        config.load(new StringReader(manifest("ConfigMap/runoff-config").get("data").get("runoff.properties").asText()));
    }

    private static JsonNode manifest(String kindAndName) {
        JsonNode doc = BY_KIND_AND_NAME.get(kindAndName);
        assertNotNull(doc, kindAndName + " not found in deploy/k8s; have " + BY_KIND_AND_NAME.keySet());
        return doc;
    }

    private static JsonNode container(JsonNode workload) {
        return workload.get("spec").get("template").get("spec").get("containers").get(0);
    }

    @Test
    void theConfigMapCarriesTheShippedConfigurationAndItIsValid() throws IOException {
        Properties shipped = new Properties();
        shipped.load(Files.newBufferedReader(DEPLOY.resolve("runoff.properties"), StandardCharsets.UTF_8));
        assertEquals(shipped, config, "deploy/k8s/configmap.yaml and deploy/runoff.properties differ");
        Map<String, String> values = new HashMap<>();
        config.stringPropertyNames().forEach(k -> values.put(k, config.getProperty(k)));
        values.put("state.dir", Path.of("target").toAbsolutePath().toString());
        JobConfig.of(values);
    }

    @Test
    void probesHitHealthAndReadyOnTheConfiguredHttpPort() {
        JsonNode c = container(manifest("StatefulSet/runoff"));
        int httpPort = Integer.parseInt(config.getProperty(AppSettings.HTTP_PORT_KEY));
        JsonNode port = c.get("ports").get(0);
        assertEquals("http", port.get("name").asText());
        assertEquals(httpPort, port.get("containerPort").asInt());
        assertEquals("/health", c.get("livenessProbe").get("httpGet").get("path").asText());
        assertEquals("/ready", c.get("readinessProbe").get("httpGet").get("path").asText());
        assertEquals("/health", c.get("startupProbe").get("httpGet").get("path").asText());
        for (String probe : List.of("livenessProbe", "readinessProbe", "startupProbe")) {
            assertEquals("http", c.get(probe).get("httpGet").get("port").asText(), probe);
        }
        for (String service : List.of("Service/runoff", "Service/runoff-headless")) {
            JsonNode p = manifest(service).get("spec").get("ports").get(0);
            assertEquals(httpPort, p.get("port").asInt(), service);
            assertEquals("http", p.get("targetPort").asText(), service);
        }
        String server = env(c).get("KAFKA_APPLICATION_SERVER");
        assertTrue(server.endsWith(".runoff-headless:" + httpPort), server);
        assertEquals("runoff-headless", manifest("StatefulSet/runoff").get("spec").get("serviceName").asText());
        assertEquals("None", manifest("Service/runoff-headless").get("spec").get("clusterIP").asText());
    }

    @Test
    void theSigningKeyIsASecretMountedWhereTheConfigurationLooks() {
        JsonNode set = manifest("StatefulSet/runoff");
        String mount = null;
        for (JsonNode m : container(set).get("volumeMounts")) {
            if (m.get("name").asText().equals("signing-key")) {
                mount = m.get("mountPath").asText();
            }
        }
        assertEquals(config.getProperty(SigningSettings.KEY_FILE_KEY), mount + "/private.pem");
        boolean secret = false;
        for (JsonNode v : set.get("spec").get("template").get("spec").get("volumes")) {
            secret |= v.get("name").asText().equals("signing-key")
                    && v.get("secret").get("secretName").asText().equals("runoff-signing-key");
        }
        assertTrue(secret, "the signing-key volume is the Secret runoff-signing-key");
    }

    @Test
    void stateStoresLiveOnAPersistentVolumeAtTheConfiguredStateDir() {
        JsonNode set = manifest("StatefulSet/runoff");
        JsonNode claim = set.get("spec").get("volumeClaimTemplates").get(0);
        String claimName = claim.get("metadata").get("name").asText();
        assertEquals("ReadWriteOnce", claim.get("spec").get("accessModes").get(0).asText());
        String mount = null;
        for (JsonNode m : container(set).get("volumeMounts")) {
            if (m.get("name").asText().equals(claimName)) {
                mount = m.get("mountPath").asText();
            }
        }
        assertEquals(config.getProperty("state.dir"), mount);
        JsonNode pod = set.get("spec").get("template").get("spec");
        assertTrue(pod.get("securityContext").get("runAsNonRoot").asBoolean());
        assertFalse(pod.get("enableServiceLinks").asBoolean(), "service links would inject KAFKA_* variables");
        long grace = pod.get("terminationGracePeriodSeconds").asLong();
        assertTrue(grace * 1000 > Long.parseLong(config.getProperty(AppSettings.SHUTDOWN_TIMEOUT_KEY)),
                "the grace period must outlast the job's shutdown timeout");
        assertEquals(List.of("run", "--config", "/etc/runoff/runoff.properties"), strings(container(set).get("args")));
    }

    @Test
    void theTopicsJobRunsTopicsCreateWithTheSameConfiguration() {
        JsonNode job = manifest("Job/runoff-topics");
        List<String> args = strings(container(job).get("args"));
        assertEquals(List.of("topics", "create", "--config", "/etc/runoff/runoff.properties"), args.subList(0, 4));
        assertEquals("OnFailure", job.get("spec").get("template").get("spec").get("restartPolicy").asText());
        assertEquals("runoff-config", job.get("spec").get("template").get("spec").get("volumes").get(0)
                .get("configMap").get("name").asText());
    }

    @Test
    void theImageRunsTheStartScriptAsANonRootUser() throws IOException {
        List<String> lines = Files.readAllLines(DEPLOY.resolve("Dockerfile"));
        String user = lines.stream().filter(l -> l.startsWith("USER ")).findFirst().orElseThrow();
        assertFalse(user.contains("root") || user.equals("USER 0") || user.startsWith("USER 0:"), user);
        assertTrue(lines.contains("ENTRYPOINT [\"/opt/runoff/runoff.sh\"]"), "entry point");
        assertTrue(lines.contains("CMD [\"run\", \"--config\", \"/etc/runoff/runoff.properties\"]"), "default command");
        assertTrue(lines.contains("COPY deploy/runoff.sh /opt/runoff/runoff.sh"));
        assertTrue(lines.contains("COPY target/runoff.jar /opt/runoff/runoff.jar"));
    }

    private static Map<String, String> env(JsonNode container) {
        Map<String, String> env = new HashMap<>();
        for (JsonNode e : container.get("env")) {
            if (e.has("value")) {
                env.put(e.get("name").asText(), e.get("value").asText());
            }
        }
        return env;
    }

    private static List<String> strings(JsonNode array) {
        List<String> out = new ArrayList<>();
        array.forEach(n -> out.add(n.asText()));
        return out;
    }

    @Test
    void onlyTheMonitoringAndToolsNamespacesMayReachTheEndpoint() {
        JsonNode policy = manifest("NetworkPolicy/runoff").get("spec");
        JsonNode podLabels = manifest("StatefulSet/runoff").get("spec").get("template").get("metadata").get("labels");
        assertEquals(podLabels, policy.get("podSelector").get("matchLabels"), "the policy selects the job's pods");
        assertEquals(List.of("Ingress"), strings(policy.get("policyTypes")));
        int httpPort = Integer.parseInt(config.getProperty(AppSettings.HTTP_PORT_KEY));
        List<String> namespaces = new ArrayList<>();
        for (JsonNode rule : policy.get("ingress")) {
            for (JsonNode port : rule.get("ports")) {
                assertEquals(httpPort, port.get("port").asInt());
                assertEquals("TCP", port.get("protocol").asText());
            }
            assertTrue(rule.has("from"), "a rule without 'from' admits everyone");
            for (JsonNode peer : rule.get("from")) {
                assertEquals(List.of("namespaceSelector"), fieldNames(peer), "only whole named namespaces");
                JsonNode labels = peer.get("namespaceSelector").get("matchLabels");
                assertEquals(List.of("kubernetes.io/metadata.name"), fieldNames(labels));
                namespaces.add(labels.get("kubernetes.io/metadata.name").asText());
            }
        }
        assertEquals(List.of("monitoring", "runoff-tools"), namespaces);
    }

    @Test
    void thePodListensBeyondLoopbackAndTakesItsTokenFromAnOptionalSecret() {
        assertEquals("0.0.0.0", config.getProperty(SafetySettings.BIND_ADDRESS_KEY), "probes reach the pod IP");
        assertFalse(config.stringPropertyNames().contains(SafetySettings.TOKEN_KEY), "no token in the ConfigMap");
        JsonNode token = null;
        for (JsonNode e : container(manifest("StatefulSet/runoff")).get("env")) {
            if (e.get("name").asText().equals("RUNOFF_HTTP_TOKEN")) {
                token = e;
            }
        }
        assertNotNull(token, "RUNOFF_HTTP_TOKEN");
        assertEquals(SafetySettings.TOKEN_KEY, ConfigSources.keyOf("RUNOFF_HTTP_TOKEN"));
        JsonNode ref = token.get("valueFrom").get("secretKeyRef");
        assertEquals("runoff-http-token", ref.get("name").asText());
        assertTrue(ref.get("optional").asBoolean(), "no Secret: no token, the job still starts");
    }

    @Test
    void eachPodJoinsTheGroupAsAStaticMemberNamedAfterItself() {
        Map<String, String> env = env(container(manifest("StatefulSet/runoff")));
        // Kubernetes expands $(POD_NAME) from the earlier variable (dependent environment variables)
        assertEquals("$(POD_NAME)", env.get("KAFKA_GROUP_INSTANCE_ID"));
        assertEquals("group.instance.id", ConfigSources.keyOf("KAFKA_GROUP_INSTANCE_ID"));
        assertEquals("10000", config.getProperty("consumer.session.timeout.ms"));
    }

    @Test
    void kafkaCredentialsComeFromASecretInBothTheJobAndTheTopicsJob() {
        // the properties that SecuredClusterIT (src/cli) runs the job, the CLI and the client library with
        assertEquals("SASL_SSL", config.getProperty("security.protocol"));
        assertEquals("SCRAM-SHA-512", config.getProperty("sasl.mechanism"));
        assertEquals("PEM", config.getProperty("ssl.truststore.type"));
        assertFalse(config.stringPropertyNames().contains("sasl.jaas.config"), "no password in the ConfigMap");
        assertEquals("sasl.jaas.config", ConfigSources.keyOf("KAFKA_SASL_JAAS_CONFIG"));
        for (String workload : List.of("StatefulSet/runoff", "Job/runoff-topics")) {
            JsonNode pod = manifest(workload).get("spec").get("template").get("spec");
            JsonNode c = container(manifest(workload));
            JsonNode ref = envEntry(c, "KAFKA_SASL_JAAS_CONFIG").get("valueFrom").get("secretKeyRef");
            assertEquals("runoff-kafka-client", ref.get("name").asText(), workload);
            assertEquals("sasl.jaas.config", ref.get("key").asText(), workload);
            assertFalse(ref.path("optional").asBoolean(false),
                    workload + ": without credentials the job must not start");
            JsonNode volume = named(pod.get("volumes"), "kafka-client");
            assertEquals("runoff-kafka-client", volume.get("secret").get("secretName").asText(), workload);
            assertEquals(List.of("ca.crt"), volume.get("secret").get("items").findValuesAsText("key"),
                    workload + ": only the certificate is mounted, the JAAS line stays out of the file system");
            String mount = named(c.get("volumeMounts"), "kafka-client").get("mountPath").asText();
            String path = volume.get("secret").get("items").get(0).get("path").asText();
            assertEquals(config.getProperty("ssl.truststore.location"), mount + "/" + path, workload);
            // Kubernetes: Secret files are owned by root and the pod's fsGroup; mode 0440 leaves others out
            assertEquals(pod.get("securityContext").get("runAsGroup").asLong(),
                    pod.get("securityContext").path("fsGroup").asLong(-1),
                    workload + ": fsGroup lets the user read it");
        }
    }

    private static JsonNode envEntry(JsonNode container, String name) {
        return named(container.get("env"), name);
    }

    private static JsonNode named(JsonNode array, String name) {
        for (JsonNode n : array) {
            if (n.get("name").asText().equals(name)) {
                return n;
            }
        }
        throw new AssertionError("no entry named " + name + " in " + array);
    }

    private static List<String> fieldNames(JsonNode node) {
        List<String> names = new ArrayList<>();
        node.fieldNames().forEachRemaining(names::add);
        return names;
    }
}
