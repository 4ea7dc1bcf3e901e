package org.wayhold.config;

import static org.assertj.core.api.Assertions.assertThat;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import java.io.IOException;
import java.io.InputStream;
import java.nio.charset.StandardCharsets;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.function.Function;
import org.junit.jupiter.api.Test;
import org.wayhold.settings.Settings;

/**
 * Settings written through the key table load back into equal settings. Expected values are the
 * settings themselves (record equality compares every double bit for bit), so no outside source is
 * needed; the non-default file sets every key to a value unlike its default, which the first test checks,
 * so a key written under the wrong name or left out cannot pass unseen.
 */
class ConfigRoundTripTest {

    private static final Function<String, String> NO_ENV = name -> null;

    /** Every key set away from its default, tokens included. */
    static Settings everyKey() {
        try (InputStream in = ConfigRoundTripTest.class.getResourceAsStream("every-key.yaml")) {
            return ConfigLoader.parse(new String(in.readAllBytes(), StandardCharsets.UTF_8), "every-key.yaml", NO_ENV);
        } catch (IOException e) {
            throw new AssertionError(e);
        }
    }

    private static Settings withoutTokens(Settings s) {
        return new Settings(s.server().withTokens(List.of(), List.of()), s.filter(), s.gating(), s.outage(),
                s.ordering(), s.history(), s.vehicles(), s.journal(), s.ingest(), s.worker());
    }

    @Test
    void theNonDefaultFileSetsEveryKeyAwayFromItsDefault() {
        Map<String, JsonNode> written = leaves(ConfigLoader.toTree(everyKey()));
        Map<String, JsonNode> defaults = leaves(ConfigLoader.toTree(Settings.defaults()));
        List<String> known = ConfigLoader.knownKeys().stream()
                .filter(k -> !k.endsWith("_tokens"))
                .toList();
        assertThat(written.keySet().stream().map(k -> k.replaceFirst("^vehicles\\.[^.]+\\.", "vehicles.*.")).distinct())
                .containsExactlyInAnyOrderElementsOf(known);
        assertThat(defaults.keySet()).allSatisfy(k ->
                assertThat(written.get(k)).as(k).isNotNull().isNotEqualTo(defaults.get(k)));
        assertThat(everyKey().server().writeTokens()).isNotEqualTo(Settings.defaults().server().writeTokens());
        assertThat(everyKey().server().readTokens()).isNotEqualTo(Settings.defaults().server().readTokens());
    }

    @Test
    void theDefaultsComeBackEqualThroughYaml() {
        String yaml = ConfigLoader.toYaml(Settings.defaults());
        assertThat(ConfigLoader.parse(yaml, "written.yaml", NO_ENV)).isEqualTo(Settings.defaults());
    }

    @Test
    void aConfigurationTouchingEveryKeyComesBackEqualThroughYamlButForItsTokens() {
        Settings s = everyKey();
        String yaml = ConfigLoader.toYaml(s);
        assertThat(ConfigLoader.parse(yaml, "written.yaml", NO_ENV)).isEqualTo(withoutTokens(s));
    }

    @Test
    void theWrittenTreeAsJsonIsAlsoAConfigurationFile() throws IOException {
        Settings s = everyKey();
        String json = new ObjectMapper().writerWithDefaultPrettyPrinter().writeValueAsString(ConfigLoader.toTree(s));
        assertThat(ConfigLoader.parse(json, "written.json", NO_ENV)).isEqualTo(withoutTokens(s));
    }

    @Test
    void tokensAreNeverWrittenNorTheirKeys() {
        String yaml = ConfigLoader.toYaml(everyKey());
        assertThat(yaml).doesNotContain("token-0123456789").doesNotContain("write_tokens").doesNotContain("read_tokens");
        // The environment still supplies tokens to a written file, as to any other.
        Settings reloaded = ConfigLoader.parse(yaml, "written.yaml", Map.of(ConfigLoader.WRITE_TOKENS_ENV, "env-token")::get);
        assertThat(reloaded.server().writeTokens()).containsExactly("env-token");
    }

    @Test
    void keysCarryTheirUnitsAndFixTypesTheirWireNames() {
        String yaml = ConfigLoader.toYaml(Settings.defaults());
        assertThat(yaml).contains("gyro_bias_random_walk_rad_per_s_per_sqrt_s:", "rtk_fixed:", "alert_limit_m:")
                .doesNotContain("THREE_D").doesNotContain("gyroBias").doesNotContain("sper");
    }

    private static Map<String, JsonNode> leaves(JsonNode tree) {
        Map<String, JsonNode> out = new LinkedHashMap<>();
        flatten("", tree, out);
        return out;
    }

    private static void flatten(String prefix, JsonNode node, Map<String, JsonNode> out) {
        for (Map.Entry<String, JsonNode> e : node.properties()) {
            String path = prefix.isEmpty() ? e.getKey() : prefix + "." + e.getKey();
            if (e.getValue().isObject()) {
                flatten(path, e.getValue(), out);
            } else {
                out.put(path, e.getValue());
            }
        }
    }
}
