package org.wayhold.config;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.node.MissingNode;
import java.util.ArrayList;
import java.util.EnumMap;
import java.util.Iterator;
import java.util.LinkedHashMap;
import java.util.LinkedHashSet;
import java.util.List;
import java.util.Map;
import java.util.Set;
import java.util.function.Function;
import java.util.function.Predicate;
import java.util.function.ToDoubleFunction;
import java.util.function.ToIntFunction;
import java.util.function.ToLongFunction;
import org.wayhold.sample.FixType;
import org.wayhold.settings.SettingsException;
import org.wayhold.settings.Settings;

/**
 * Reads one YAML mapping into one settings record through the {@link KeyTable}. Each key the table asks
 * for is registered, which is how a run over an empty mapping learns the known keys.
 *
 * @param <R> the record this mapping builds
 */
final class KeyReader<R> implements KeyTable.Keys<R> {

    /** Keys within this edit distance of an unknown key are offered as "did you mean". */
    private static final int SUGGEST_DISTANCE = 2;

    private final String path;
    private final JsonNode node;
    private final String source;
    private final List<String> leaves;
    private final R defaults;
    private final Function<String, String> env;
    private final Set<String> asked = new LinkedHashSet<>();

    private KeyReader(String path, JsonNode node, String source, List<String> leaves, R defaults,
                      Function<String, String> env) {
        this.path = path;
        this.node = node;
        this.source = source;
        this.leaves = leaves;
        this.defaults = defaults;
        this.env = env;
    }

    /** Reads a whole configuration tree; {@code env} looks up environment variables (null when unset). */
    static Settings settings(JsonNode root, String source, Function<String, String> env) {
        return new KeyReader<>("", root, source, new ArrayList<>(), Settings.defaults(), env)
                .read(KeyTable::settings);
    }

    /** Every key of the table as a full path, in table order ({@code vehicles.*.KEY} for profiles). */
    static List<String> knownKeys() {
        List<String> leaves = new ArrayList<>();
        new KeyReader<>("", MissingNode.getInstance(), "key table", leaves, Settings.defaults(), name -> null)
                .read(KeyTable::settings);
        return List.copyOf(new LinkedHashSet<>(leaves));
    }

    /**
     * Builds this mapping's record: first rejects keys the table does not know, then runs the table; a
     * record's own refusal ({@link SettingsException}, which carries the key) becomes a ConfigException.
     */
    private R read(Function<KeyTable.Keys<R>, R> table) {
        KeyReader<R> dry = new KeyReader<>(path, MissingNode.getInstance(), source, new ArrayList<>(), defaults, env);
        table.apply(dry);
        Iterator<String> names = node.fieldNames();
        while (names.hasNext()) {
            String name = names.next();
            if (!dry.asked.contains(name)) {
                throw ConfigException.atKey(pathOf(name), unknown(name, dry.asked), source);
            }
        }
        try {
            return table.apply(this);
        } catch (SettingsException e) {
            throw ConfigException.atKey(keyOf(e), e.problem(), source);
        } catch (IllegalArgumentException e) {
            // A refusal that names no key of its own is put on this mapping.
            throw ConfigException.atKey(path, e.getMessage(), source);
        }
    }

    /** The full key a record refused; a vehicle profile names its keys vehicles.*.KEY. */
    private String keyOf(SettingsException e) {
        String key = e.key();
        if (key.startsWith("vehicles.*.") && path.startsWith("vehicles.")) {
            return path + key.substring("vehicles.*".length());
        }
        return key;
    }

    @Override
    public <T> T section(String key, Function<R, T> component, Function<KeyTable.Keys<T>, T> table) {
        return new KeyReader<>(pathOf(key), mapping(key), source, leaves, component.apply(defaults), env).read(table);
    }

    @Override
    public <T> Map<String, T> named(String key, Function<R, Map<String, T>> component, T profileDefaults,
                                    Function<KeyTable.Keys<T>, T> table) {
        JsonNode profiles = mapping(key);
        // Learn the profile keys even when no profile is configured, for knownKeys().
        new KeyReader<>(pathOf(key) + ".*", MissingNode.getInstance(), source, leaves, profileDefaults, env)
                .read(table);
        Map<String, T> result = new LinkedHashMap<>();
        for (Map.Entry<String, JsonNode> e : profiles.properties()) {
            String name = e.getKey();
            JsonNode v = e.getValue();
            if (v == null || v.isNull()) {
                v = MissingNode.getInstance();
            } else if (!v.isObject()) {
                throw ConfigException.atKey(pathOf(key) + "." + name, "must be a mapping, was " + describe(v), source);
            }
            result.put(name, new KeyReader<>(pathOf(key) + "." + name, v, source, new ArrayList<>(), profileDefaults,
                    env).read(table));
        }
        return result;
    }

    @Override
    public double number(String key, ToDoubleFunction<R> component) {
        JsonNode v = value(key);
        if (v == null) {
            return component.applyAsDouble(defaults);
        }
        if (!v.isNumber()) {
            throw wrongType(key, "must be a number", v);
        }
        return v.doubleValue();
    }

    @Override
    public int integer(String key, ToIntFunction<R> component) {
        JsonNode v = value(key);
        if (v == null) {
            return component.applyAsInt(defaults);
        }
        if (!v.isIntegralNumber() || !v.canConvertToInt()) {
            throw wrongType(key, "must be a whole number", v);
        }
        return v.intValue();
    }

    @Override
    public long longInteger(String key, ToLongFunction<R> component) {
        JsonNode v = value(key);
        if (v == null) {
            return component.applyAsLong(defaults);
        }
        if (!v.isIntegralNumber() || !v.canConvertToLong()) {
            throw wrongType(key, "must be a whole number", v);
        }
        return v.longValue();
    }

    @Override
    public boolean bool(String key, Predicate<R> component) {
        JsonNode v = value(key);
        if (v == null) {
            return component.test(defaults);
        }
        if (!v.isBoolean()) {
            throw wrongType(key, "must be true or false", v);
        }
        return v.booleanValue();
    }

    @Override
    public String text(String key, Function<R, String> component) {
        JsonNode v = value(key);
        if (v == null) {
            return component.apply(defaults);
        }
        if (!v.isTextual()) {
            throw wrongType(key, "must be text", v);
        }
        return v.textValue();
    }

    @Override
    public List<String> texts(String key, Function<R, List<String>> component) {
        JsonNode v = value(key);
        if (v == null) {
            return component.apply(defaults);
        }
        if (!v.isArray()) {
            throw wrongType(key, "must be a list of text", v);
        }
        List<String> result = new ArrayList<>();
        for (JsonNode item : v) {
            if (!item.isTextual()) {
                throw wrongType(key, "must be a list of text, has an item that", item);
            }
            result.add(item.textValue());
        }
        return result;
    }

    /**
     * The file's list unless the environment variable is set and not blank. A blank variable is ignored
     * rather than read as "none", and one that holds no token ({@code ","}) is refused: it was meant to
     * configure tokens, and reading it as "no tokens" would silently open the service.
     */
    @Override
    public List<String> secrets(String key, String environmentVariable, Function<R, List<String>> component) {
        List<String> fromFile = texts(key, component);
        String value = env.apply(environmentVariable);
        if (value == null || value.isBlank()) {
            return fromFile;
        }
        List<String> fromEnv = new ArrayList<>();
        for (String item : value.split(",")) {
            if (!item.isBlank()) {
                fromEnv.add(item.trim());
            }
        }
        if (fromEnv.isEmpty()) {
            throw ConfigException.atKey(pathOf(key), "the environment variable " + environmentVariable
                    + " is set but holds no token; unset it to use the file's list, or give tokens", source);
        }
        return fromEnv;
    }

    @Override
    public Map<FixType, Double> fixScale(String key, Function<R, Map<FixType, Double>> component) {
        for (FixType f : FixType.values()) {
            leaves.add(pathOf(key) + "." + f.wireName());
        }
        JsonNode v = mapping(key);
        Map<FixType, Double> result = new EnumMap<>(component.apply(defaults));
        Iterator<String> names = v.fieldNames();
        while (names.hasNext()) {
            String name = names.next();
            FixType fix;
            try {
                fix = FixType.fromWireName(name);
            } catch (IllegalArgumentException e) {
                throw ConfigException.atKey(pathOf(key) + "." + name,
                        "unknown fix type, expected one of none, 2d, 3d, dgnss, rtk_float, rtk_fixed", source);
            }
            JsonNode scale = v.get(name);
            if (scale.isNull()) {
                throw ConfigException.atKey(pathOf(key) + "." + name, "must have a value, was empty", source);
            }
            if (!scale.isNumber()) {
                throw ConfigException.atKey(pathOf(key) + "." + name, "must be a number, was " + describe(scale),
                        source);
            }
            result.put(fix, scale.doubleValue());
        }
        return result;
    }

    /** The value of a key, or null when the mapping does not have it. */
    private JsonNode value(String key) {
        asked.add(key);
        leaves.add(pathOf(key));
        JsonNode v = node.get(key);
        if (v != null && v.isNull()) {
            throw wrongType(key, "must have a value", v);
        }
        return v;
    }

    /** A nested mapping; absent or empty ({@code key:} with nothing under it) reads as all defaults. */
    private JsonNode mapping(String key) {
        asked.add(key);
        JsonNode v = node.get(key);
        if (v == null || v.isNull()) {
            return MissingNode.getInstance();
        }
        if (!v.isObject()) {
            throw wrongType(key, "must be a mapping", v);
        }
        return v;
    }

    private String pathOf(String key) {
        return path.isEmpty() ? key : path + "." + key;
    }

    private ConfigException wrongType(String key, String expected, JsonNode v) {
        return ConfigException.atKey(pathOf(key), expected + ", was " + describe(v), source);
    }

    private String unknown(String name, Set<String> known) {
        String best = null;
        int bestDistance = SUGGEST_DISTANCE + 1;
        for (String k : known) {
            int d = editDistance(name, k);
            if (d < bestDistance) {
                best = k;
                bestDistance = d;
            }
        }
        return best == null ? "unknown key" : "unknown key, did you mean " + pathOf(best) + "?";
    }

    private static String describe(JsonNode v) {
        if (v.isNull()) {
            return "empty";
        }
        if (v.isObject()) {
            return "a mapping";
        }
        if (v.isArray()) {
            return "a list";
        }
        if (v.isTextual()) {
            return "'" + v.textValue() + "'";
        }
        return v.asText();
    }

    /** Levenshtein distance, for suggesting the key a typo meant. */
    private static int editDistance(String a, String b) {
        int[] previous = new int[b.length() + 1];
        int[] current = new int[b.length() + 1];
        for (int j = 0; j <= b.length(); j++) {
            previous[j] = j;
        }
        for (int i = 1; i <= a.length(); i++) {
            current[0] = i;
            for (int j = 1; j <= b.length(); j++) {
                int substitution = previous[j - 1] + (a.charAt(i - 1) == b.charAt(j - 1) ? 0 : 1);
                current[j] = Math.min(substitution, Math.min(previous[j], current[j - 1]) + 1);
            }
            int[] swap = previous;
            previous = current;
            current = swap;
        }
        return previous[b.length()];
    }
}
