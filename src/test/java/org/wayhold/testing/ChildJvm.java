package org.wayhold.testing;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.concurrent.TimeUnit;
import java.util.function.Predicate;

/** A wayhold command in a child JVM on the test class path, and the wait for it to say it is ready. */
final class ChildJvm {

    private ChildJvm() {
    }

    /** Starts {@code org.wayhold.cli.Main} with {@code jvmFlags} and {@code mainArgs}, all output to {@code output}. */
    static Process launch(List<String> jvmFlags, List<String> mainArgs, Path output) throws IOException {
        String classPath = System.getProperty("surefire.test.class.path", System.getProperty("java.class.path"));
        String java = Path.of(System.getProperty("java.home"), "bin", "java").toString();
        List<String> command = new ArrayList<>();
        command.add(java);
        command.addAll(jvmFlags);
        command.addAll(List.of("-cp", classPath, "org.wayhold.cli.Main"));
        command.addAll(mainArgs);
        ProcessBuilder pb = new ProcessBuilder(command);
        pb.redirectErrorStream(true);
        pb.redirectOutput(output.toFile());
        return pb.start();
    }

    /**
     * Waits (bounded) until the child's output satisfies {@code ready} and returns that output; kills the
     * child and fails, showing the output, when it exits first or the time runs out.
     *
     * @param what the command's name for the failure messages
     */
    static String awaitOutput(Process p, Path output, Predicate<String> ready, long timeoutS, String what)
            throws IOException, InterruptedException {
        long deadline = System.nanoTime() + TimeUnit.SECONDS.toNanos(timeoutS);
        while (System.nanoTime() < deadline) {
            String text = Files.exists(output) ? Files.readString(output) : "";
            if (ready.test(text)) {
                return text;
            }
            if (!p.isAlive()) {
                throw new AssertionError(what + " exited with " + p.exitValue() + ":\n" + text);
            }
            Thread.sleep(20);
        }
        p.destroyForcibly();
        throw new AssertionError(what + " did not start within " + timeoutS + " s:\n" + Files.readString(output));
    }
}
