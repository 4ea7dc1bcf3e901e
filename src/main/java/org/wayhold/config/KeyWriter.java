package org.wayhold.config;

import com.fasterxml.jackson.databind.node.JsonNodeFactory;
import com.fasterxml.jackson.databind.node.ObjectNode;
import java.util.List;
import java.util.Map;
import java.util.TreeMap;
import java.util.function.Function;
import java.util.function.Predicate;
import java.util.function.ToDoubleFunction;
import java.util.function.ToIntFunction;
import java.util.function.ToLongFunction;
import org.wayhold.sample.FixType;
import org.wayhold.settings.Settings;

/**
 * Writes one settings record into a tree through the {@link KeyTable}: every key the table names, in
 * table order, with the record's value, except secrets. Running the table this way also rebuilds the
 * record from the values it wrote; a record that does not come back equal means a table line pairs a key
 * with the wrong component, and writing fails rather than produce a file that loads differently.
 *
 * @param <R> the record written into this mapping
 */
final class KeyWriter<R> implements KeyTable.Keys<R> {

    private final String path;
    private final R record;
    private final ObjectNode out;

    private KeyWriter(String path, R record, ObjectNode out) {
        this.path = path;
        this.record = record;
        this.out = out;
    }

    /** The settings as a configuration tree, tokens left out. */
    static ObjectNode settings(Settings settings) {
        ObjectNode root = JsonNodeFactory.instance.objectNode();
        new KeyWriter<>("", settings, root).write(KeyTable::settings);
        return root;
    }

    private void write(Function<KeyTable.Keys<R>, R> table) {
        R rebuilt = table.apply(this);
        if (!rebuilt.equals(record)) {
            throw new IllegalStateException("the key table of '" + (path.isEmpty() ? "settings" : path)
                    + "' does not rebuild the record it writes: " + record + " came back as " + rebuilt);
        }
    }

    @Override
    public <T> T section(String key, Function<R, T> component, Function<KeyTable.Keys<T>, T> table) {
        T value = component.apply(record);
        new KeyWriter<>(pathOf(key), value, out.putObject(key)).write(table);
        return value;
    }

    /** Profiles in name order, so the same settings always give the same text. */
    @Override
    public <T> Map<String, T> named(String key, Function<R, Map<String, T>> component, T defaults,
                                    Function<KeyTable.Keys<T>, T> table) {
        Map<String, T> value = component.apply(record);
        ObjectNode profiles = out.putObject(key);
        new TreeMap<>(value).forEach((name, profile) ->
                new KeyWriter<>(pathOf(key) + "." + name, profile, profiles.putObject(name)).write(table));
        return value;
    }

    @Override
    public double number(String key, ToDoubleFunction<R> component) {
        double v = component.applyAsDouble(record);
        out.put(key, v);
        return v;
    }

    @Override
    public int integer(String key, ToIntFunction<R> component) {
        int v = component.applyAsInt(record);
        out.put(key, v);
        return v;
    }

    @Override
    public long longInteger(String key, ToLongFunction<R> component) {
        long v = component.applyAsLong(record);
        out.put(key, v);
        return v;
    }

    @Override
    public boolean bool(String key, Predicate<R> component) {
        boolean v = component.test(record);
        out.put(key, v);
        return v;
    }

    @Override
    public String text(String key, Function<R, String> component) {
        String v = component.apply(record);
        out.put(key, v);
        return v;
    }

    @Override
    public List<String> texts(String key, Function<R, List<String>> component) {
        List<String> v = component.apply(record);
        v.forEach(out.putArray(key)::add);
        return v;
    }

    /** Never written: a report or a copied configuration must not carry credentials. */
    @Override
    public List<String> secrets(String key, String environmentVariable, Function<R, List<String>> component) {
        return component.apply(record);
    }

    @Override
    public Map<FixType, Double> fixScale(String key, Function<R, Map<FixType, Double>> component) {
        Map<FixType, Double> v = component.apply(record);
        ObjectNode scales = out.putObject(key);
        for (FixType f : FixType.values()) {
            scales.put(f.wireName(), v.get(f));
        }
        return v;
    }

    private String pathOf(String key) {
        return path.isEmpty() ? key : path + "." + key;
    }
}
