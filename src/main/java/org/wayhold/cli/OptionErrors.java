package org.wayhold.cli;

import java.nio.file.AccessDeniedException;
import java.nio.file.Files;
import java.nio.file.NoSuchFileException;
import java.nio.file.Path;
import java.util.Map;
import picocli.CommandLine.Model.CommandSpec;
import picocli.CommandLine.ParameterException;

/**
 * Errors in the user's words: the records below the command line name their fields ({@code every},
 * {@code route.durationS}); a user typed options ({@code --every}, {@code --minutes}). These helpers
 * turn one into the other and name the option of a missing file.
 */
final class OptionErrors {

    private OptionErrors() {
    }

    /**
     * A bad option value, its message starting with the option that set the value when a record's field
     * name leads the message ({@code "every: must be ..."} becomes {@code "--every: must be ..."}).
     *
     * @param optionNames record field names (the text before the first colon) to option names
     */
    static ParameterException named(CommandSpec spec, IllegalArgumentException e, Map<String, String> optionNames) {
        return new ParameterException(spec.commandLine(), rename(e.getMessage(), optionNames), e);
    }

    /** The message with a leading field name replaced by its option, unchanged when there is none. */
    static String rename(String message, Map<String, String> optionNames) {
        int colon = message.indexOf(':');
        if (colon < 0) {
            return message;
        }
        String option = optionNames.get(message.substring(0, colon));
        return option == null ? message : option + message.substring(colon);
    }

    /** Refuses a path that is not a readable regular file, naming the option (or parameter) that gave it. */
    static void requireFile(CommandSpec spec, String option, Path file) {
        if (!Files.exists(file)) {
            throw new ParameterException(spec.commandLine(), option + ": no such file " + file);
        }
        if (!Files.isRegularFile(file)) {
            throw new ParameterException(spec.commandLine(), option + ": not a file: " + file);
        }
        if (!Files.isReadable(file)) {
            throw new ParameterException(spec.commandLine(), option + ": cannot be read (permission denied): " + file);
        }
    }

    /** An I/O failure in words: "no such file", "permission denied", else the exception's own message. */
    static String describe(java.io.IOException e) {
        if (e instanceof NoSuchFileException) {
            return "no such file";
        }
        if (e instanceof AccessDeniedException) {
            return "permission denied";
        }
        return e.getMessage() == null ? e.getClass().getSimpleName() : e.getMessage();
    }
}
