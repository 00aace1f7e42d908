package dev.onefold.examples.consumer;

import java.io.IOException;
import java.io.UncheckedIOException;
import java.net.InetAddress;
import java.net.ServerSocket;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Comparator;
import java.util.List;
import java.util.Properties;
import java.util.stream.Stream;
import kafka.server.KafkaConfig;
import kafka.server.KafkaRaftServer;
import org.apache.kafka.clients.admin.Admin;
import org.apache.kafka.clients.admin.AdminClientConfig;
import org.apache.kafka.clients.admin.NewTopic;
import org.apache.kafka.common.Uuid;
import org.apache.kafka.common.utils.Time;
import org.apache.kafka.metadata.storage.Formatter;
import org.apache.kafka.server.common.Feature;
import org.apache.kafka.server.common.MetadataVersion;

/**
 * A real Apache Kafka broker run in this JVM for tests: one node acting as broker and KRaft controller,
 * listening on 127.0.0.1 only, with its log directory in a fresh temporary directory that {@link #close()}
 * deletes after shutting the broker down. Not thread-safe; one per test.
 */
final class LoopbackKafkaBroker implements AutoCloseable {
    private final Path logDir;
    private final KafkaRaftServer server;
    private final String bootstrap;

    LoopbackKafkaBroker() throws Exception {
        logDir = Files.createTempDirectory("onefold-kraft-");
        int brokerPort = freeLoopbackPort();
        int controllerPort = freeLoopbackPort();
        bootstrap = "127.0.0.1:" + brokerPort;
        Properties p = new Properties();
        p.put("process.roles", "broker,controller");
        p.put("node.id", "1");
        p.put("controller.quorum.voters", "1@127.0.0.1:" + controllerPort);
        p.put("listeners", "PLAINTEXT://127.0.0.1:" + brokerPort + ",CONTROLLER://127.0.0.1:" + controllerPort);
        p.put("advertised.listeners", "PLAINTEXT://" + bootstrap);
        p.put("controller.listener.names", "CONTROLLER");
        p.put("listener.security.protocol.map", "PLAINTEXT:PLAINTEXT,CONTROLLER:PLAINTEXT");
        p.put("inter.broker.listener.name", "PLAINTEXT");
        p.put("log.dirs", logDir.toString());
        p.put("offsets.topic.replication.factor", "1");
        p.put("offsets.topic.num.partitions", "1");
        p.put("transaction.state.log.replication.factor", "1");
        p.put("transaction.state.log.min.isr", "1");
        p.put("group.initial.rebalance.delay.ms", "0");
        KafkaConfig config = new KafkaConfig(p);
        try {
            new Formatter().setNodeId(1).setClusterId(Uuid.randomUuid().toString())
                    .setDirectories(List.of(logDir.toString())).setMetadataLogDirectory(logDir.toString())
                    .setReleaseVersion(MetadataVersion.LATEST_PRODUCTION).setSupportedFeatures(Feature.PRODUCTION_FEATURES)
                    .setControllerListenerName("CONTROLLER").setPrintStream(System.out).run();
            server = new KafkaRaftServer(config, Time.SYSTEM);
            server.startup();
        } catch (Exception | Error e) {
            deleteTree(logDir);
            throw e;
        }
    }

    private static int freeLoopbackPort() throws IOException {
        try (ServerSocket s = new ServerSocket(0, 1, InetAddress.getLoopbackAddress())) {
            return s.getLocalPort();
        }
    }

    String bootstrap() {
        return bootstrap;
    }

    void createTopic(String name, int partitions) throws Exception {
        Properties p = new Properties();
        p.put(AdminClientConfig.BOOTSTRAP_SERVERS_CONFIG, bootstrap);
        try (Admin admin = Admin.create(p)) {
            admin.createTopics(List.of(new NewTopic(name, partitions, (short) 1))).all().get();
        }
    }

    Path logDir() {
        return logDir;
    }

    @Override
    public void close() {
        try {
            server.shutdown();
            server.awaitShutdown();
        } finally {
            deleteTree(logDir);
        }
    }

    private static void deleteTree(Path root) {
        if (!Files.exists(root)) {
            return;
        }
        try (Stream<Path> paths = Files.walk(root)) {
            for (Path path : paths.sorted(Comparator.reverseOrder()).toList()) {
                Files.deleteIfExists(path);
            }
        } catch (IOException e) {
            throw new UncheckedIOException("could not delete broker directory " + root, e);
        }
    }
}
