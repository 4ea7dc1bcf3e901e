package org.wayhold.cli;

import java.io.PrintWriter;
import java.nio.file.Path;
import java.time.Duration;
import java.util.List;
import java.util.concurrent.Callable;
import java.util.regex.Pattern;
import org.wayhold.config.ConfigLoader;
import org.wayhold.settings.Settings;
import org.wayhold.settings.WorkerSettings;
import org.wayhold.stream.Worker;
import org.wayhold.stream.WorkerTopics;
import picocli.CommandLine.Command;
import picocli.CommandLine.Model.CommandSpec;
import picocli.CommandLine.Option;
import picocli.CommandLine.ParameterException;
import picocli.CommandLine.Spec;

/**
 * {@code wayhold worker}: one worker of the fleet mode on Apache Kafka, until SIGTERM or Ctrl-C. Several
 * workers with the same configuration share the vehicles of the samples topic and take over from each
 * other; see {@link Worker}.
 */
@Command(name = "worker", mixinStandardHelpOptions = true,
        description = "Runs one worker of the fleet mode on Apache Kafka (Kafka Streams) until SIGTERM or Ctrl-C.")
final class WorkerCommand implements Callable<Integer> {

    /** {@code host:port}, comma-separated; a host may be a name, an IPv4 address or an IPv6 one in brackets. */
    static final Pattern BOOTSTRAP = Pattern.compile("(?:[A-Za-z0-9.-]+|\\[[0-9A-Fa-f:.]+\\]):\\d{1,5}"
            + "(?:,(?:[A-Za-z0-9.-]+|\\[[0-9A-Fa-f:.]+\\]):\\d{1,5})*");

    @Spec
    private CommandSpec spec;

    @Option(names = "--bootstrap", paramLabel = "HOST:PORT", required = true,
            description = "Kafka brokers to start from, HOST:PORT[,HOST:PORT...].")
    private String bootstrap;

    @Option(names = "--config", paramLabel = "FILE",
            description = "YAML settings (the worker section names the topics); built-in defaults when the file "
                    + "does not exist (default: ${DEFAULT-VALUE}).")
    private Path config = Path.of("config", "wayhold.yaml");

    /** Refuses a broker list that is not {@code HOST:PORT[,HOST:PORT...]}, naming the option. */
    static void checkBootstrap(CommandSpec spec, String option, String value) {
        if (!BOOTSTRAP.matcher(value).matches()) {
            throw new ParameterException(spec.commandLine(), option + ": must be HOST:PORT[,HOST:PORT...], was '"
                    + value + "'");
        }
    }

    @Override
    public Integer call() throws Exception {
        checkBootstrap(spec, "--bootstrap", bootstrap);
        PrintWriter out = spec.commandLine().getOut();
        PrintWriter err = spec.commandLine().getErr();
        Settings settings = ConfigLoader.loadOrDefaults(config);
        WorkerSettings w = settings.worker();
        Worker worker = new Worker(settings, bootstrap);
        List<String> created;
        try {
            created = worker.start();
        } catch (WorkerTopics.Refused e) {
            worker.close();
            err.println(e.getMessage());
            err.flush();
            return 1;
        }
        if (!created.isEmpty()) {
            out.println("worker: created topics " + String.join(", ", created) + " (" + w.partitions()
                    + " partitions, replication factor " + w.replicationFactor() + ")");
        }
        out.println("wayhold worker started: application " + w.applicationId() + ", samples from " + w.samplesTopic()
                + ", poses to " + w.posesTopic() + ", events to " + w.eventsTopic() + ", refused samples to "
                + w.deadLetterTopic() + " (Ctrl-C to stop)");
        out.flush();
        Runtime.getRuntime().addShutdownHook(new Thread(() -> {
            worker.close();
            out.println("wayhold worker stopped");
            out.flush();
        }, "wayhold-worker-shutdown"));
        if (worker.awaitRunning(Duration.ofMinutes(5))) {
            out.println("wayhold worker running");
            out.flush();
        }
        while (!worker.awaitEnd(Duration.ofSeconds(1))) {
            // Runs until the shutdown hook closes the worker, or an error stops it.
        }
        Throwable failure = worker.failure();
        if (failure != null) {
            err.println("worker: stopped on an error: " + failure);
            err.flush();
            return 1;
        }
        return 0;
    }
}
