package org.wayhold.config;

import com.fasterxml.jackson.core.JacksonException;
import com.fasterxml.jackson.core.JsonLocation;
import com.fasterxml.jackson.core.JsonParser;
import com.fasterxml.jackson.core.JsonStreamContext;
import com.fasterxml.jackson.core.JsonToken;
import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.node.MissingNode;
import com.fasterxml.jackson.databind.node.ObjectNode;
import com.fasterxml.jackson.dataformat.yaml.YAMLGenerator;
import com.fasterxml.jackson.dataformat.yaml.YAMLMapper;
import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.file.Files;
import java.nio.file.NoSuchFileException;
import java.nio.file.Path;
import java.util.ArrayDeque;
import java.util.Deque;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.function.Function;
import org.wayhold.settings.Settings;

/**
 * Reads {@code config/wayhold.yaml} into {@link Settings}, and writes settings back as a file it reads.
 *
 * <p>The keys are those of {@link KeyTable}, the one place a key, its unit and its record component
 * are named; reading and writing both run that table, so whatever {@link #toYaml} or {@link #toTree}
 * writes loads back into equal settings (bearer tokens excepted: they are never written).
 *
 * <p>Rules: a missing key takes its default; an unknown key, a key given twice in one mapping, a value
 * of the wrong YAML type, a value the settings records refuse or an unknown fix type name is a
 * {@link ConfigException} whose message starts with the full key path. A section left empty
 * ({@code filter:} with nothing under it) means all defaults. Unknown keys are reported before bad
 * values, since a misspelt key usually explains the rest.
 *
 * <p>Bearer tokens may also come from the environment: {@value #WRITE_TOKENS_ENV} and
 * {@value #READ_TOKENS_ENV}, comma-separated, replace {@code server.write_tokens} and
 * {@code server.read_tokens} when set and not blank, so secrets need not live in the file. A blank
 * variable is ignored rather than read as "no tokens", so it cannot switch authentication off.
 */
public final class ConfigLoader {

    public static final String WRITE_TOKENS_ENV = "WAYHOLD_WRITE_TOKENS";
    public static final String READ_TOKENS_ENV = "WAYHOLD_READ_TOKENS";

    private static final YAMLMapper YAML = YAMLMapper.builder()
            .disable(YAMLGenerator.Feature.WRITE_DOC_START_MARKER)
            .build();

    private ConfigLoader() {
    }

    /** Reads a YAML file; tokens from the process environment override the file's. */
    public static Settings load(Path yamlFile) {
        return load(yamlFile, System::getenv);
    }

    /** Reads a YAML file; {@code env} looks up environment variables (null when unset). */
    public static Settings load(Path yamlFile, Function<String, String> env) {
        String source = yamlFile.toString();
        String text;
        try {
            text = Files.readString(yamlFile);
        } catch (NoSuchFileException e) {
            throw ConfigException.inSource("no such file", source, e);
        } catch (IOException e) {
            throw ConfigException.inSource("cannot be read: " + e.getMessage(), source, e);
        }
        return parse(text, source, env);
    }

    /** The file when it exists, the built-in defaults otherwise (tokens from the environment either way). */
    public static Settings loadOrDefaults(Path yamlFile) {
        return loadOrDefaults(yamlFile, System::getenv);
    }

    /** As {@link #loadOrDefaults(Path)}, with an injectable environment lookup. */
    public static Settings loadOrDefaults(Path yamlFile, Function<String, String> env) {
        return Files.exists(yamlFile) ? load(yamlFile, env) : parse("", "built-in defaults", env);
    }

    /** Reads YAML text; {@code sourceName} only labels error messages. */
    public static Settings parse(String yaml, String sourceName) {
        return parse(yaml, sourceName, System::getenv);
    }

    /** Reads YAML text with an injectable environment lookup (null when a variable is unset). */
    public static Settings parse(String yaml, String sourceName, Function<String, String> env) {
        JsonNode root;
        try {
            root = YAML.readTree(yaml);
        } catch (JacksonException e) {
            throw ConfigException.inSource("not valid YAML" + where(e.getLocation()) + ": " + e.getOriginalMessage(),
                    sourceName, e);
        }
        if (root == null || root.isMissingNode() || root.isNull()) {
            root = MissingNode.getInstance();
        } else if (!root.isObject()) {
            throw ConfigException.inSource("the top level must be a mapping of sections (server, filter, ...)",
                    sourceName, null);
        }
        refuseDuplicateKeys(yaml, sourceName);
        return KeyReader.settings(root, sourceName, env);
    }

    /**
     * The settings as a configuration tree that {@link #parse} reads back into equal settings: every key
     * of the table with its value, sections and keys in the table's order, vehicle profiles by name;
     * bearer tokens are left out (an empty list on reading). As JSON it is also valid YAML.
     */
    public static ObjectNode toTree(Settings settings) {
        return KeyWriter.settings(settings);
    }

    /** {@link #toTree} as YAML text. */
    public static String toYaml(Settings settings) {
        try {
            return YAML.writeValueAsString(toTree(settings));
        } catch (JacksonException e) {
            throw new IllegalStateException("settings could not be written as YAML", e);
        }
    }

    /**
     * Every key the loader knows, as full paths; vehicle profiles appear as {@code vehicles.*.KEY} and
     * fix-type scales as {@code filter.gnss_fix_scale.NAME}. In table order.
     */
    static List<String> knownKeys() {
        return KeyReader.knownKeys();
    }

    /**
     * A key given twice in one mapping is refused with its full path and both lines: YAML leaves the
     * outcome to the reader, and silently taking either value would hide a mistake in the file.
     */
    private static void refuseDuplicateKeys(String yaml, String sourceName) {
        try (JsonParser p = YAML.getFactory().createParser(yaml)) {
            Deque<Map<String, Integer>> seen = new ArrayDeque<>();
            JsonToken t;
            while ((t = p.nextToken()) != null) {
                if (t == JsonToken.START_OBJECT) {
                    seen.push(new HashMap<>());
                } else if (t == JsonToken.END_OBJECT) {
                    seen.pop();
                } else if (t == JsonToken.FIELD_NAME) {
                    int line = p.currentLocation().getLineNr();
                    Integer first = seen.peek().putIfAbsent(p.currentName(), line);
                    if (first != null) {
                        throw ConfigException.atKey(keyPath(p.getParsingContext()),
                                "given twice in the same mapping (lines " + first + " and " + line + ")", sourceName);
                    }
                }
            }
        } catch (IOException e) {
            // Already read once as a tree: a parse failure here cannot be new, so the tree's error stands.
            throw new UncheckedIOException(e);
        }
    }

    /** The dotted key path of a parser position, such as {@code filter.gnss_floor_m}. */
    private static String keyPath(JsonStreamContext context) {
        Deque<String> names = new ArrayDeque<>();
        for (JsonStreamContext c = context; c != null; c = c.getParent()) {
            if (c.inObject() && c.getCurrentName() != null) {
                names.push(c.getCurrentName());
            }
        }
        return String.join(".", names);
    }

    private static String where(JsonLocation location) {
        return location == null || location.getLineNr() < 1 ? ""
                : " at line " + location.getLineNr() + ", column " + location.getColumnNr();
    }
}
