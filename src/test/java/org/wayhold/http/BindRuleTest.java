package org.wayhold.http;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.assertThatThrownBy;

import java.io.PrintWriter;
import java.io.StringWriter;
import java.nio.file.Path;
import java.util.List;
import org.junit.jupiter.api.Assumptions;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.wayhold.cli.Main;
import org.wayhold.config.ConfigLoader;
import org.wayhold.settings.ServerSettings;
import picocli.CommandLine;

/** The listening address: loopback by default; anything else needs write tokens or {@code --insecure}. */
class BindRuleTest {

    private static final String LONG_TOKEN = "a-long-enough-write-token-42";

    private static ServerSettings at(String bind, List<String> write, List<String> read) {
        return ServerSettings.defaults().withAddress(0, bind).withTokens(write, read);
    }

    @Test
    void theDefaultAddressIsLoopbackAndNeedsNothing() {
        assertThat(ServerSettings.defaults().bind()).isEqualTo("127.0.0.1");
        assertThat(BindRule.check(ServerSettings.defaults(), false)).isEmpty();
    }

    @Test
    void everyLoopbackFormIsLoopback() {
        // RFC 5735 sec. 3: all of 127.0.0.0/8 is loopback; RFC 4291 sec. 2.5.3: ::1 is IPv6 loopback.
        for (String bind : List.of("127.0.0.1", "127.0.0.2", "::1", "localhost")) {
            assertThat(BindRule.check(at(bind, List.of(), List.of()), false)).as(bind).isEmpty();
        }
    }

    @Test
    void aNonLoopbackAddressWithoutWriteTokensIsRefused() {
        for (String bind : List.of("0.0.0.0", "::", "192.0.2.10")) {
            assertThatThrownBy(() -> BindRule.check(at(bind, List.of(), List.of(READ_ONLY)), false))
                    .as(bind)
                    .isInstanceOf(BindRule.Refused.class)
                    .hasMessageStartingWith("server.bind: " + bind + " is not a loopback address")
                    .hasMessageContaining("--insecure")
                    .hasMessageContaining("server.write_tokens");
        }
    }

    private static final String READ_ONLY = "a-long-enough-read-token-42";

    @Test
    void insecureAllowsItWithAWarning() {
        List<String> warnings = BindRule.check(at("0.0.0.0", List.of(), List.of()), true);
        assertThat(warnings).anySatisfy(w -> assertThat(w).startsWith("WARNING: --insecure").contains("0.0.0.0"));
    }

    @Test
    void writeTokensAllowIt() {
        List<String> warnings = BindRule.check(at("0.0.0.0", List.of(LONG_TOKEN), List.of()), false);
        assertThat(warnings).singleElement().asString().startsWith("note: no read tokens");
        assertThat(BindRule.check(at("0.0.0.0", List.of(LONG_TOKEN), List.of(READ_ONLY)), false)).isEmpty();
    }

    @Test
    void shortTokensAreWarnedAboutWithoutBeingShown() {
        List<String> warnings = BindRule.check(at("127.0.0.1", List.of("short1"), List.of("short2")), false);
        assertThat(warnings).hasSize(2).allSatisfy(w -> assertThat(w).doesNotContain("short1", "short2"));
        assertThat(warnings.get(0)).contains("server.write_tokens: item 1");
    }

    @Test
    void anAddressThatDoesNotResolveIsRefused() {
        // RFC 6761 sec. 6.4: names under .invalid never resolve.
        assertThatThrownBy(() -> BindRule.check(at("no-such-host.invalid", List.of(LONG_TOKEN), List.of()), false))
                .isInstanceOf(BindRule.Refused.class).hasMessageContaining("cannot resolve");
    }

    @Test
    void serveRefusesToStartOnANonLoopbackAddressWithoutTokens(@TempDir Path dir) {
        Assumptions.assumeTrue(System.getenv(ConfigLoader.WRITE_TOKENS_ENV) == null,
                "the environment configures write tokens, so serve would start");
        StringWriter out = new StringWriter();
        StringWriter err = new StringWriter();
        CommandLine cl = Main.newCommandLine();
        cl.setOut(new PrintWriter(out));
        cl.setErr(new PrintWriter(err));
        int exit = cl.execute("serve", "--config", dir.resolve("absent.yaml").toString(), "--port", "0",
                "--bind", "0.0.0.0");
        assertThat(exit).isEqualTo(2);
        assertThat(err.toString()).contains("server.bind: 0.0.0.0 is not a loopback address", "--insecure");
        assertThat(out.toString()).doesNotContain("serving on");
    }
}
