package org.wayhold.cli;

import java.io.PrintWriter;
import picocli.CommandLine;
import picocli.CommandLine.Command;
import picocli.CommandLine.Model.CommandSpec;
import picocli.CommandLine.Spec;

/**
 * The {@code wayhold} command line: one subcommand class per command, wired here and nowhere else.
 */
@Command(name = "wayhold", mixinStandardHelpOptions = true, version = "wayhold 0.1.0",
        description = "Holds a road vehicle's position through GNSS dropouts.",
        subcommands = {SimulateCommand.class, ScoreCommand.class, ServeCommand.class})
public final class Main implements Runnable {

    @Spec
    private CommandSpec spec;

    public static void main(String[] args) {
        System.exit(newCommandLine().execute(args));
    }

    /**
     * The configured command line, so tests can redirect its output and read its exit code:
     * 0 success, 1 failure while running, 2 bad options.
     */
    public static CommandLine newCommandLine() {
        CommandLine cl = new CommandLine(new Main());
        cl.setExecutionExceptionHandler((e, commandLine, parseResult) -> {
            PrintWriter err = commandLine.getErr();
            err.println(commandLine.getColorScheme().errorText(
                    commandLine.getCommandName() + ": " + e.getMessage()));
            err.flush();
            return 1;
        });
        return cl;
    }

    /** Without a subcommand there is nothing to do: say what there is. */
    @Override
    public void run() {
        throw new CommandLine.ParameterException(spec.commandLine(), "a command is required");
    }
}
