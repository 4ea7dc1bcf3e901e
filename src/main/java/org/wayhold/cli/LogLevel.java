package org.wayhold.cli;

import java.util.List;
import java.util.Locale;

/**
 * The {@code --log-level} option's values. Choosing one sets the level of the SLF4J simple logger (the
 * binding on the class path, configured by {@code simplelogger.properties}) through its system
 * properties, which take precedence over the file. That must happen before the first logger is made,
 * since the simple logger reads its configuration once: picocli sets options before any command runs,
 * and nothing logs while the command line is read.
 *
 * <p>The level applies to wayhold's own loggers. Jetty, Javalin and Kafka stay at {@code warn} (their
 * {@code debug} output is the web server's internals, not wayhold's) unless the level asks for less
 * ({@code error} or {@code off}), which then applies to them too.
 */
enum LogLevel {
    TRACE, DEBUG, INFO, WARN, ERROR, OFF;

    static final String DEFAULT_PROPERTY = "org.slf4j.simpleLogger.defaultLogLevel";
    static final List<String> QUIETED_LIBRARIES = List.of("org.eclipse.jetty", "io.javalin", "org.apache.kafka");
    static final String LIBRARY_PROPERTY = "org.slf4j.simpleLogger.log.";

    /** The level as the simple logger spells it. */
    String loggerName() {
        return name().toLowerCase(Locale.ROOT);
    }

    /** Makes this the level of every logger created from now on. */
    void apply() {
        System.setProperty(DEFAULT_PROPERTY, loggerName());
        if (compareTo(WARN) > 0) {
            for (String library : QUIETED_LIBRARIES) {
                System.setProperty(LIBRARY_PROPERTY + library, loggerName());
            }
        }
    }
}
