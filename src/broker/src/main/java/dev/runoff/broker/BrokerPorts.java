package dev.runoff.broker;

import java.io.IOException;
import java.io.UncheckedIOException;
import java.net.InetAddress;
import java.net.InetSocketAddress;
import java.net.ServerSocket;

/**
 * The two loopback ports of a one-node broker: the client listener ({@code PLAINTEXT}) and the KRaft
 * controller listener ({@code CONTROLLER}).
 *
 * @param broker port of the {@code PLAINTEXT} listener that clients connect to
 * @param controller port of the {@code CONTROLLER} listener used by the KRaft quorum
 */
record BrokerPorts(int broker, int controller) {
    /** Host every listener binds to: loopback only, so a demo broker is never reachable from outside. */
    static final String HOST = "127.0.0.1";
    /** Name of the client listener. */
    static final String CLIENT_LISTENER = "PLAINTEXT";
    /** Name of the KRaft controller listener. */
    static final String CONTROLLER_LISTENER = "CONTROLLER";

    BrokerPorts {
        checkPort("brokerPort", broker);
        checkPort("controllerPort", controller);
        if (broker == controller) {
            throw new IllegalArgumentException(
                    "brokerPort and controllerPort must differ, both are " + broker);
        }
    }

    /**
     * Asks the operating system for two distinct free loopback ports. Both sockets are held open
     * together so the two ports differ; they are closed before the broker binds them, which leaves a
     * small race that {@link EmbeddedKafkaBroker#start()} covers by retrying once.
     */
    static BrokerPorts pickFree() {
        try (ServerSocket first = openEphemeral(); ServerSocket second = openEphemeral()) {
            return new BrokerPorts(first.getLocalPort(), second.getLocalPort());
        } catch (IOException e) {
            throw new UncheckedIOException("could not find a free port on " + HOST, e);
        }
    }

    /**
     * Binds and releases each port in the order Kafka binds them (controller first), so a port taken by
     * another socket is found before Kafka tries it: a controller listener that cannot bind makes Kafka
     * halt the JVM instead of throwing. Address reuse is on, as for Kafka's own server sockets, so
     * connections of a previous run lingering in TIME_WAIT do not count as busy.
     *
     * @throws BindFailure naming the first listener whose port cannot be bound
     */
    void probe() throws BindFailure {
        probe(CONTROLLER_LISTENER, controller);
        probe(CLIENT_LISTENER, broker);
    }

    /** Returns {@code host:port} of the client listener. */
    String bootstrapServers() {
        return HOST + ":" + broker;
    }

    @Override
    public String toString() {
        return describe(CLIENT_LISTENER);
    }

    /** Both listeners with their addresses, the client listener under {@code clientListener}. */
    String describe(String clientListener) {
        return clientListener + " " + HOST + ":" + broker + ", " + CONTROLLER_LISTENER + " " + HOST + ":" + controller;
    }

    private static void probe(String listener, int port) throws BindFailure {
        try (ServerSocket socket = new ServerSocket()) {
            socket.setReuseAddress(true);
            socket.bind(new InetSocketAddress(InetAddress.getByName(HOST), port), 1);
        } catch (IOException e) {
            throw new BindFailure(listener + " " + HOST + ":" + port, e);
        }
    }

    private static ServerSocket openEphemeral() throws IOException {
        return new ServerSocket(0, 1, InetAddress.getByName(HOST));
    }

    private static void checkPort(String name, int port) {
        if (port < 1 || port > 65_535) {
            throw new IllegalArgumentException(name + " must be in [1, 65535], got " + port);
        }
    }
}
