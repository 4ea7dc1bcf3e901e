package org.wayhold.cli;

import static org.assertj.core.api.Assertions.assertThat;

import java.io.PrintWriter;
import java.io.StringWriter;
import java.util.HashMap;
import java.util.Map;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.BeforeEach;
import org.junit.jupiter.api.Test;
import org.wayhold.BuildInfo;
import picocli.CommandLine;

/**
 * The options every command takes. Expected values: the build's own {@link BuildInfo} and the SLF4J
 * simple logger's documented system properties ({@code org.slf4j.simpleLogger.defaultLogLevel},
 * {@code org.slf4j.simpleLogger.log.NAME}, slf4j-simple 2.0). Only {@code --help} runs, so no logger is
 * made while a level is set, and every property is restored afterwards.
 */
class MainOptionsTest {

    private static final String[] PROPERTIES = {LogLevel.DEFAULT_PROPERTY,
        LogLevel.LIBRARY_PROPERTY + "org.eclipse.jetty", LogLevel.LIBRARY_PROPERTY + "io.javalin",
        LogLevel.LIBRARY_PROPERTY + "org.apache.kafka"};
    private final Map<String, String> saved = new HashMap<>();
    private final StringWriter out = new StringWriter();
    private final StringWriter err = new StringWriter();

    @BeforeEach
    void saveProperties() {
        for (String p : PROPERTIES) {
            saved.put(p, System.getProperty(p));
            System.clearProperty(p);
        }
    }

    @AfterEach
    void restoreProperties() {
        saved.forEach((p, v) -> {
            if (v == null) {
                System.clearProperty(p);
            } else {
                System.setProperty(p, v);
            }
        });
    }

    private int run(String... args) {
        CommandLine cl = Main.newCommandLine();
        cl.setOut(new PrintWriter(out, true));
        cl.setErr(new PrintWriter(err, true));
        return cl.execute(args);
    }

    @Test
    void versionPrintsTheVersionAndTheCommitForEveryCommand() {
        assertThat(run("--version")).isZero();
        String top = out.toString();
        assertThat(top).isEqualTo("wayhold " + BuildInfo.current().describe() + System.lineSeparator())
                .matches("wayhold \\S+ \\(commit (unknown|[0-9a-f]{7,40}(-dirty)?)\\)\\R");
        for (String command : new String[] {"simulate", "serve", "score"}) {
            out.getBuffer().setLength(0);
            assertThat(run(command, "--version")).isZero();
            assertThat(out.toString()).isEqualTo(top);
        }
    }

    @Test
    void theLogLevelIsSetBeforeOrAfterTheCommandsName() {
        assertThat(run("--log-level", "debug", "serve", "--help")).isZero();
        assertThat(System.getProperty(LogLevel.DEFAULT_PROPERTY)).isEqualTo("debug");
        // Jetty's and Javalin's debug output is the web server's internals: they stay at the file's warn.
        assertThat(System.getProperty(PROPERTIES[1])).isNull();
        assertThat(run("score", "--log-level", "WARN", "--help")).isZero();
        assertThat(System.getProperty(LogLevel.DEFAULT_PROPERTY)).isEqualTo("warn");
    }

    @Test
    void aQuieterLevelThanWarnSilencesTheWebServerToo() {
        assertThat(run("simulate", "--log-level", "off", "--help")).isZero();
        for (String p : PROPERTIES) {
            assertThat(System.getProperty(p)).as(p).isEqualTo("off");
        }
    }

    @Test
    void anUnknownLevelIsRefusedNamingTheOptionAndTheLevels() {
        assertThat(run("serve", "--log-level", "loud")).isEqualTo(2);
        assertThat(err.toString()).startsWith("wayhold serve: Invalid value for option '--log-level'")
                .contains("DEBUG").contains("'loud'").contains("Try 'wayhold serve --help'");
        assertThat(System.getProperty(LogLevel.DEFAULT_PROPERTY)).isNull();
    }
}
