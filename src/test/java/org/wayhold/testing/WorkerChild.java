package org.wayhold.testing;

import java.io.IOException;
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
        List<String> args = new ArrayList<>(List.of("worker"));
        args.addAll(workerArgs);
        Process p = ChildJvm.launch(List.of("-Xmx256m", "-XX:+UseSerialGC"), args, output);
        ChildJvm.awaitOutput(p, output, text -> text.contains(RUNNING), timeoutS, "worker");
        return new WorkerChild(p, output);
    }

    /** SIGKILL, as a machine that dies: no clean leave of the group, no commit of the open transaction. */
    public void kill() throws InterruptedException {
        process.destroyForcibly();
        process.waitFor(30, TimeUnit.SECONDS);
    }
}
