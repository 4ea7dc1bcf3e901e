package org.wayhold.testing;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.concurrent.TimeUnit;

/**
 * {@code wayhold worker} in a child JVM on the test class path, started as {@link ServeChild} starts
 * {@code serve}: its own process, so a test can kill it with SIGKILL as a machine failure would.
 *
 * @param process the child
 * @param output  the file holding everything the child printed
 */
public record WorkerChild(Process process, Path output) {

    /** What the worker prints once its first rebalance is done and it processes records. */
    public static final String RUNNING = "wayhold worker running";

    /**
     * Starts {@code worker} with the given arguments and waits until it prints {@link #RUNNING}.
     *
     * @param timeoutS how long to wait (s)
     */
    public static WorkerChild start(Path output, List<String> workerArgs, long timeoutS)
            throws IOException, InterruptedException {
        String classPath = System.getProperty("surefire.test.class.path", System.getProperty("java.class.path"));
        String java = Path.of(System.getProperty("java.home"), "bin", "java").toString();
        List<String> command = new ArrayList<>(List.of(java, "-Xmx256m", "-XX:+UseSerialGC", "-cp", classPath,
                "org.wayhold.cli.Main", "worker"));
        command.addAll(workerArgs);
        ProcessBuilder pb = new ProcessBuilder(command);
        pb.redirectErrorStream(true);
        pb.redirectOutput(output.toFile());
        Process p = pb.start();
        long deadline = System.nanoTime() + TimeUnit.SECONDS.toNanos(timeoutS);
        while (System.nanoTime() < deadline) {
            String text = Files.exists(output) ? Files.readString(output) : "";
            if (text.contains(RUNNING)) {
                return new WorkerChild(p, output);
            }
            if (!p.isAlive()) {
                throw new AssertionError("worker exited with " + p.exitValue() + ":\n" + text);
            }
            Thread.sleep(20);
        }
        p.destroyForcibly();
        throw new AssertionError("worker did not run within " + timeoutS + " s:\n" + Files.readString(output));
    }

    /** SIGKILL, as a machine that dies: no clean leave of the group, no commit of the open transaction. */
    public void kill() throws InterruptedException {
        process.destroyForcibly();
        process.waitFor(30, TimeUnit.SECONDS);
    }
}
