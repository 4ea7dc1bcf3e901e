package org.wayhold.cli;

import java.io.PrintWriter;
import java.util.concurrent.Callable;
import org.wayhold.BuildInfo;
import picocli.CommandLine;
import picocli.CommandLine.Command;
import picocli.CommandLine.IVersionProvider;
import picocli.CommandLine.Model.CommandSpec;
import picocli.CommandLine.Option;
import picocli.CommandLine.ScopeType;
import picocli.CommandLine.Spec;

/**
 * The {@code wayhold} command line: one subcommand class per command, wired here and nowhere else.
 * Options every command takes: {@code --help}, {@code --version} (the version and the git commit of the
 * build) and {@code --log-level}, before or after the command's name.
 */
@Command(name = "wayhold", mixinStandardHelpOptions = true, versionProvider = Main.Version.class,
        scope = ScopeType.INHERIT,
        description = "Holds a road vehicle's position through GNSS dropouts.",
        subcommands = {SimulateCommand.class, ScoreCommand.class, FuseCommand.class, ServeCommand.class,
                CalibrateCommand.class, WorkerCommand.class})
public final class Main implements Callable<Integer> {

    @Spec
    private CommandSpec spec;

    /** Inherited by every command, so it may come before or after the command's name. */
    @Option(names = "--log-level", paramLabel = "LEVEL", scope = ScopeType.INHERIT,
            description = "Log level of wayhold's messages: trace, debug, info, warn, error or off "
                    + "(default: info). Jetty and Javalin log warnings only, or nothing below LEVEL when it "
                    + "is error or off.")
    void logLevel(LogLevel level) {
        level.apply();
    }

    /** {@code wayhold 0.1.0 (commit 1a2b3c4d5e6f)}: what was built, and from which commit. */
    static final class Version implements IVersionProvider {
        @Override
        public String[] getVersion() {
            return new String[] {"wayhold " + BuildInfo.current().describe()};
        }
    }

    public static void main(String[] args) {
        System.exit(newCommandLine().execute(args));
    }

    /**
     * The configured command line, so tests can redirect its output and read its exit code:
     * 0 success, 1 failure while running, 2 bad options.
     */
    public static CommandLine newCommandLine() {
        CommandLine cl = new CommandLine(new Main());
        cl.setCaseInsensitiveEnumValuesAllowed(true);
        // A bad option gets one line naming it and a pointer to the help, not pages of usage.
        cl.setParameterExceptionHandler((e, args) -> {
            CommandLine c = e.getCommandLine();
            PrintWriter err = c.getErr();
            err.println(c.getColorScheme().errorText(c.getCommandSpec().qualifiedName() + ": " + e.getMessage()));
            CommandLine.UnmatchedArgumentException.printSuggestions(e, err);
            err.println("Try '" + c.getCommandSpec().qualifiedName() + " --help' for the options.");
            err.flush();
            return c.getCommandSpec().exitCodeOnInvalidInput();
        });
        cl.setExecutionExceptionHandler((e, commandLine, parseResult) -> {
            PrintWriter err = commandLine.getErr();
            err.println(commandLine.getColorScheme().errorText(
                    commandLine.getCommandSpec().qualifiedName() + ": " + e.getMessage()));
            err.flush();
            return 1;
        });
        return cl;
    }

    /** Without a subcommand there is nothing to do: say what there is. */
    @Override
    public Integer call() {
        PrintWriter err = spec.commandLine().getErr();
        err.println("wayhold: a command is required");
        spec.commandLine().usage(err);
        err.flush();
        return spec.exitCodeOnInvalidInput();
    }
}
