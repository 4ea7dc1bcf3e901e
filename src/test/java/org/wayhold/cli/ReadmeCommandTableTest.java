package org.wayhold.cli;

import static org.assertj.core.api.Assertions.assertThat;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.Map;
import java.util.Set;
import java.util.TreeMap;
import java.util.TreeSet;
import java.util.regex.Matcher;
import java.util.regex.Pattern;
import org.junit.jupiter.api.Test;
import picocli.CommandLine.Model.CommandSpec;
import picocli.CommandLine.Model.OptionSpec;
import picocli.CommandLine.Model.PositionalParamSpec;

/**
 * The README's command table lists every option of every command, as picocli defines them, and no other:
 * the expected values are picocli's own command specifications, so an option added, renamed or removed
 * in {@code cli} fails here until the README says so.
 */
class ReadmeCommandTableTest {

    private static final Path README = Path.of("README.md");
    private static final Pattern ROW = Pattern.compile("^\\| `java -jar target/wayhold\\.jar (\\w+) ([^`]*)` \\|");
    private static final Pattern OPTION = Pattern.compile("(?<![\\w-])--?[a-zA-Z][a-zA-Z0-9-]*");
    private static final String COMMON_LINE = "Every command also takes";

    private static String commandsSection() throws IOException {
        String text = Files.readString(README);
        int start = text.indexOf("\n## Commands\n");
        assertThat(start).as("README.md has a Commands section").isPositive();
        int end = text.indexOf("\n#", start + 1);
        return text.substring(start, end < 0 ? text.length() : end);
    }

    /** Each table row's command and the options its synopsis names. */
    private static Map<String, Set<String>> readmeRows(String section) {
        Map<String, Set<String>> rows = new TreeMap<>();
        for (String line : section.split("\n")) {
            Matcher m = ROW.matcher(line);
            if (m.find()) {
                rows.put(m.group(1), options(m.group(2)));
            }
        }
        return rows;
    }

    private static Set<String> options(String text) {
        Set<String> found = new TreeSet<>();
        Matcher m = OPTION.matcher(text);
        while (m.find()) {
            found.add(m.group());
        }
        return found;
    }

    private static CommandSpec root() {
        return Main.newCommandLine().getCommandSpec();
    }

    /** A command's own options: not help or version, not inherited from the top-level command. */
    private static Set<String> ownOptions(CommandSpec command) {
        Set<String> names = new TreeSet<>();
        for (OptionSpec o : command.options()) {
            if (!o.usageHelp() && !o.versionHelp() && !o.inherited()) {
                names.add(o.longestName());
            }
        }
        return names;
    }

    @Test
    void everyCommandHasARowListingExactlyItsOptions() throws IOException {
        Map<String, Set<String>> rows = readmeRows(commandsSection());
        Map<String, CommandSpec> commands = new TreeMap<>();
        root().subcommands().forEach((name, line) -> commands.put(name, line.getCommandSpec()));
        assertThat(rows.keySet()).as("commands with a README row").isEqualTo(commands.keySet());
        commands.forEach((name, spec) ->
                assertThat(rows.get(name)).as("options of '%s' in the README's row", name)
                        .isEqualTo(ownOptions(spec)));
    }

    @Test
    void everyPositionalParameterIsInItsCommandsRow() throws IOException {
        String section = commandsSection();
        root().subcommands().forEach((name, line) -> {
            for (PositionalParamSpec p : line.getCommandSpec().positionalParameters()) {
                String label = p.paramLabel() + (p.arity().max() > 1 ? "..." : "");
                assertThat(section).as("'%s' row names %s", name, label)
                        .containsPattern("wayhold\\.jar " + name + " " + Pattern.quote(label) + " ");
            }
        });
    }

    @Test
    void theOptionsEveryCommandTakesAreListedOnce() throws IOException {
        String common = commandsSection().lines()
                .dropWhile(l -> !l.startsWith(COMMON_LINE))
                .takeWhile(l -> !l.isBlank())
                .reduce("", (a, b) -> a + " " + b);
        assertThat(common).as("the paragraph starting '%s'", COMMON_LINE).isNotBlank();
        Set<String> expected = new TreeSet<>();
        for (OptionSpec o : root().options()) {
            expected.addAll(List.of(o.names()));
        }
        assertThat(expected).contains("--log-level", "--help", "--version");
        assertThat(options(common)).containsAll(expected);
        // Each of them really is taken by every command.
        root().subcommands().forEach((name, line) -> assertThat(line.getCommandSpec().optionsMap().keySet())
                .as("options of '%s'", name).containsAll(expected));
    }
}
