package org.wayhold.testing;

import java.io.IOException;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.concurrent.TimeUnit;
import java.util.regex.Matcher;
import java.util.regex.Pattern;

/**
 * {@code wayhold serve} in a child JVM on the test class path, for tests that need the real command:
 * its own process to stop or kill, its own output. Small heap, quick start-up flags.
 *
 * @param process the child
 * @param baseUrl {@code http://host:port} the service printed
 * @param output  the file holding everything the child printed
 */
public record ServeChild(Process process, String baseUrl, Path output) {

    private static final Pattern SERVING = Pattern.compile("wayhold serving on (http://\\S+)");

    /**
     * Starts {@code serve --port 0} with the given further arguments and waits until it prints its URL
     * (and {@code alsoWaitFor}, when not null).
     *
     * @param output   where the child's output goes (overwritten)
     * @param timeoutS how long to wait for the start (s)
     */
    public static ServeChild start(Path output, List<String> serveArgs, String alsoWaitFor, long timeoutS)
            throws IOException, InterruptedException {
        List<String> args = new ArrayList<>(List.of("serve", "--port", "0"));
        args.addAll(serveArgs);
        Process p = ChildJvm.launch(List.of("-Xmx256m", "-XX:TieredStopAtLevel=1", "-XX:+UseSerialGC"), args,
                output);
        String text = ChildJvm.awaitOutput(p, output,
                t -> SERVING.matcher(t).find() && (alsoWaitFor == null || t.contains(alsoWaitFor)), timeoutS, "serve");
        Matcher m = SERVING.matcher(text);
        m.find();
        return new ServeChild(p, m.group(1), output);
    }

    /** SIGTERM (a graceful stop), and SIGKILL after 30 s. */
    public void stop() throws InterruptedException {
        process.destroy();
        if (!process.waitFor(30, TimeUnit.SECONDS)) {
            process.destroyForcibly();
        }
    }
}
