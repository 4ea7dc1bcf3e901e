package org.wayhold;

import static org.assertj.core.api.Assertions.assertThat;

import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.regex.Matcher;
import java.util.regex.Pattern;
import java.util.stream.Stream;
import org.junit.jupiter.api.Test;

/**
 * The numerical core imports no web, JSON, YAML or Kafka library, so that it can be tested, reused and
 * reasoned about without the HTTP edge or the stream worker. The rule is checked on the source text: a forbidden import
 * in any core package fails the build with the file and the line.
 */
class ArchitectureTest {

    private static final Path MAIN_SOURCES = Path.of("src", "main", "java", "org", "wayhold");

    private static final List<String> CORE_PACKAGES = List.of(
            "sample", "geo", "settings", "ordering", "filter", "pipeline", "columns", "pose", "session", "scoring", "fusion",
            "calibration", "simulate", "journal", "nmea");

    private static final List<String> FORBIDDEN_PREFIXES = List.of(
            "io.javalin", "com.fasterxml.jackson", "org.yaml", "jakarta.servlet", "org.apache.kafka");

    private static final Pattern IMPORT = Pattern.compile("^\\s*import\\s+(?:static\\s+)?([\\w.]+)", Pattern.MULTILINE);

    @Test
    void corePackagesImportNoWebJsonOrYamlLibrary() {
        List<String> violations = new ArrayList<>();
        int scannedFiles = 0;
        for (String pkg : CORE_PACKAGES) {
            Path dir = MAIN_SOURCES.resolve(pkg);
            if (!Files.isDirectory(dir)) {
                continue;
            }
            for (Path file : javaFiles(dir)) {
                scannedFiles++;
                for (String imported : forbiddenImports(read(file))) {
                    violations.add(file + " imports " + imported);
                }
            }
        }
        // Guards against scanning nothing (a moved source tree would otherwise pass silently).
        assertThat(scannedFiles).as("core source files scanned").isGreaterThan(0);
        assertThat(violations).as("forbidden imports in the numerical core").isEmpty();
    }

    @Test
    void theScannerCatchesEachForbiddenLibraryAndIgnoresLookalikes() {
        String source = """
                package org.wayhold.filter;

                import java.util.List;
                import io.javalin.Javalin;
                import static com.fasterxml.jackson.databind.SerializationFeature.INDENT_OUTPUT;
                import org.yaml.snakeyaml.Yaml;
                  import jakarta.servlet.http.HttpServletRequest;
                import org.yamlish.Other;
                """;
        assertThat(forbiddenImports(source)).containsExactly(
                "io.javalin.Javalin",
                "com.fasterxml.jackson.databind.SerializationFeature.INDENT_OUTPUT",
                "org.yaml.snakeyaml.Yaml",
                "jakarta.servlet.http.HttpServletRequest");
    }

    /** Imported names that start with a forbidden package (whole package segments only). */
    static List<String> forbiddenImports(String source) {
        List<String> found = new ArrayList<>();
        Matcher m = IMPORT.matcher(source);
        while (m.find()) {
            String name = m.group(1);
            for (String prefix : FORBIDDEN_PREFIXES) {
                if (name.equals(prefix) || name.startsWith(prefix + ".")) {
                    found.add(name);
                }
            }
        }
        return found;
    }

    private static List<Path> javaFiles(Path dir) {
        try (Stream<Path> files = Files.walk(dir)) {
            return files.filter(p -> p.toString().endsWith(".java")).sorted().toList();
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }

    private static String read(Path file) {
        try {
            return Files.readString(file);
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }
}
