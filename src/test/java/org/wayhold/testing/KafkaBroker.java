package org.wayhold.testing;

import java.io.IOException;
import java.io.OutputStream;
import java.io.PrintStream;
import java.io.UncheckedIOException;
import java.net.InetAddress;
import java.net.ServerSocket;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Comparator;
import java.util.List;
import java.util.Properties;
import java.util.concurrent.TimeUnit;
import java.util.stream.Stream;
import kafka.server.KafkaConfig;
import kafka.server.KafkaRaftServer;
import org.apache.kafka.clients.admin.Admin;
import org.apache.kafka.clients.admin.AdminClientConfig;
import org.apache.kafka.common.Uuid;
import org.apache.kafka.common.utils.Time;
import org.apache.kafka.metadata.storage.Formatter;
import org.apache.kafka.server.common.Feature;
import org.apache.kafka.server.common.MetadataVersion;

/**
 * One Kafka broker in this JVM, in KRaft mode (broker and controller in one node, no ZooKeeper), on
 * 127.0.0.1 only, with ports found free by probing (a fixed port can collide with another process, and
 * Kafka halts the JVM when it cannot bind). Internal topics are made with one replica and a few
 * partitions, so the first consumer group and the first transaction start quickly.
 */
public final class KafkaBroker implements AutoCloseable {

    private final Path dir;
    private final KafkaRaftServer server;
    private final String bootstrap;

    private KafkaBroker(Path dir, KafkaRaftServer server, String bootstrap) {
        this.dir = dir;
        this.server = server;
        this.bootstrap = bootstrap;
    }

    /** Sets Kafka's loggers (client and broker) to {@code level} for loggers made from now on. */
    public static void logLevel(String level) {
        for (String name : List.of("kafka", "org.apache.kafka", "state.change.logger")) {
            System.setProperty("org.slf4j.simpleLogger.log." + name, level);
        }
    }

    /** Formats a fresh log directory and starts the broker; returns once it answers an admin request. */
    public static KafkaBroker start() throws Exception {
        Path dir = Files.createTempDirectory("wayhold-kafka-");
        int brokerPort = freePort();
        int controllerPort = freePort();
        while (controllerPort == brokerPort) {
            controllerPort = freePort();
        }
        Properties p = new Properties();
        p.put("process.roles", "broker,controller");
        p.put("node.id", "1");
        p.put("controller.quorum.voters", "1@127.0.0.1:" + controllerPort);
        p.put("listeners", "PLAINTEXT://127.0.0.1:" + brokerPort + ",CONTROLLER://127.0.0.1:" + controllerPort);
        p.put("advertised.listeners", "PLAINTEXT://127.0.0.1:" + brokerPort);
        p.put("controller.listener.names", "CONTROLLER");
        p.put("listener.security.protocol.map", "PLAINTEXT:PLAINTEXT,CONTROLLER:PLAINTEXT");
        p.put("inter.broker.listener.name", "PLAINTEXT");
        p.put("log.dirs", dir.toString());
        p.put("num.partitions", "1");
        p.put("auto.create.topics.enable", "false");
        p.put("offsets.topic.replication.factor", "1");
        p.put("offsets.topic.num.partitions", "3");
        p.put("transaction.state.log.replication.factor", "1");
        p.put("transaction.state.log.min.isr", "1");
        p.put("transaction.state.log.num.partitions", "3");
        p.put("share.coordinator.state.topic.replication.factor", "1");
        p.put("share.coordinator.state.topic.min.isr", "1");
        p.put("group.initial.rebalance.delay.ms", "0");
        p.put("log.segment.bytes", Integer.toString(16 * 1024 * 1024));
        KafkaConfig config = new KafkaConfig(p);
        new Formatter()
                .setPrintStream(new PrintStream(OutputStream.nullOutputStream()))
                .setNodeId(1)
                .setClusterId(Uuid.randomUuid().toString())
                .setDirectories(List.of(dir.toString()))
                .setMetadataLogDirectory(dir.toString())
                .setSupportedFeatures(Feature.PRODUCTION_FEATURES)
                .setReleaseVersion(MetadataVersion.LATEST_PRODUCTION)
                .setControllerListenerName("CONTROLLER")
                .run();
        KafkaRaftServer server = new KafkaRaftServer(config, Time.SYSTEM);
        server.startup();
        String bootstrap = "127.0.0.1:" + brokerPort;
        KafkaBroker broker = new KafkaBroker(dir, server, bootstrap);
        Properties admin = new Properties();
        admin.put(AdminClientConfig.BOOTSTRAP_SERVERS_CONFIG, bootstrap);
        try (Admin a = Admin.create(admin)) {
            a.describeCluster().nodes().get(60, TimeUnit.SECONDS);
        } catch (Exception e) {
            broker.close();
            throw e;
        }
        return broker;
    }

    /** A port nothing listens on now (probed on 127.0.0.1). */
    static int freePort() throws IOException {
        try (ServerSocket s = new ServerSocket(0, 1, InetAddress.getLoopbackAddress())) {
            return s.getLocalPort();
        }
    }

    /** {@code 127.0.0.1:PORT} of the broker's listener. */
    public String bootstrap() {
        return bootstrap;
    }

    @Override
    public void close() {
        server.shutdown();
        server.awaitShutdown();
        try (Stream<Path> paths = Files.walk(dir)) {
            paths.sorted(Comparator.reverseOrder()).forEach(f -> f.toFile().delete());
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }
}
