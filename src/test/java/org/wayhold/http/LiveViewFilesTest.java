package org.wayhold.http;

import static org.assertj.core.api.Assertions.assertThat;

import java.io.IOException;
import java.io.UncheckedIOException;
import java.net.http.HttpResponse;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.Map;
import java.util.Set;
import java.util.TreeSet;
import java.util.regex.Matcher;
import java.util.regex.Pattern;
import java.util.stream.Collectors;
import java.util.stream.Stream;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.TestInstance;

/**
 * The live view's files on a real server with read tokens configured: every file of {@code web/} is
 * served without a token and with its type, the data routes still need one, and the page's module
 * graph is complete (every import and every name index.html gives resolves to a file, and index.html
 * names every module, so none is fetched late or left out of the jar unnoticed).
 *
 * <p>Expected types: {@code text/javascript} is the JavaScript type of RFC 9239 (sec. 6), and the HTML
 * Living Standard runs a module script only when its response has a JavaScript MIME type; {@code text/css}
 * is RFC 2318; {@code text/html} is RFC 2854. All three are sent with {@code charset=utf-8}, the files'
 * encoding.
 */
@TestInstance(TestInstance.Lifecycle.PER_CLASS)
class LiveViewFilesTest {

    static final String READ = "read-token-0123456789abcdef";
    static final String WRITE = "write-token-0123456789abcdef";

    static final Map<String, String> TYPES = Map.of(
            "html", "text/html; charset=utf-8",
            "js", "text/javascript; charset=utf-8",
            "css", "text/css; charset=utf-8");

    private LiveServer server;
    private Path webDir;

    @BeforeAll
    void start() {
        server = new LiveServer(LiveServer.settings(s -> s.withTokens(List.of(WRITE), List.of(READ))));
        // The sources, not the build's copy: a file deleted from the sources may linger in target/classes.
        webDir = Path.of("src/main/resources" + LiveView.CLASSPATH_DIR);
    }

    @AfterAll
    void stop() {
        server.close();
    }

    /** Paths of the page's files as the browser asks for them ("/js/main.js"). */
    private Set<String> pageFiles() {
        try (Stream<Path> files = Files.walk(webDir)) {
            return files.filter(Files::isRegularFile)
                    .map(f -> "/" + webDir.relativize(f).toString().replace('\\', '/'))
                    .collect(Collectors.toCollection(TreeSet::new));
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }

    private String read(String pagePath) {
        try {
            return Files.readString(webDir.resolve(pagePath.substring(1)), StandardCharsets.UTF_8);
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }

    /** A media type as compared here: parameters may be written with or without a space (RFC 9110 sec. 8.3.1). */
    private static String withoutSpaces(String mediaType) {
        return mediaType.replace(" ", "").toLowerCase(java.util.Locale.ROOT);
    }

    private static String extension(String path) {
        return path.substring(path.lastIndexOf('.') + 1);
    }

    @Test
    void everyFileOfThePageIsServedWithoutATokenAndWithItsType() {
        Set<String> files = pageFiles();
        assertThat(files).contains("/index.html", "/view.css", "/js/main.js");
        for (String path : files) {
            HttpResponse<String> r = server.get(path);
            assertThat(r.statusCode()).as(path).isEqualTo(200);
            assertThat(r.headers().firstValue("Content-Type").map(LiveViewFilesTest::withoutSpaces)).as(path)
                    .contains(withoutSpaces(TYPES.get(extension(path))));
            assertThat(r.body()).as(path).isEqualTo(read(path));
        }
        HttpResponse<String> index = server.get("/");
        assertThat(index.statusCode()).isEqualTo(200);
        assertThat(index.body()).isEqualTo(read("/index.html"));
    }

    @Test
    void theDataStaysBehindTheToken() {
        for (String path : List.of("/v1/vehicles", "/v1/vehicles/car-1/pose", "/v1/vehicles/car-1/stream", "/metrics")) {
            assertThat(server.get(path).statusCode()).as(path).isEqualTo(401);
        }
        // Names that look like the page's but are not its files are checked like any other path.
        for (String path : List.of("/js/missing.js", "/missing.html", "/js/", "/js", "/view.css.map", "/JS/main.js",
                "/js/../view.css", "/js/%2e%2e/view.css", "/web/index.html")) {
            assertThat(server.get(path).statusCode()).as(path).isEqualTo(401);
        }
    }

    @Test
    void indexNamesEveryModuleAndEveryImportResolves() {
        Set<String> modules = pageFiles().stream().filter(p -> p.endsWith(".js"))
                .collect(Collectors.toCollection(TreeSet::new));
        String index = read("/index.html");
        Set<String> named = new TreeSet<>();
        Matcher m = Pattern.compile("<(?:script type=\"module\" src|link rel=\"modulepreload\" href)=\"([^\"]+)\"")
                .matcher(index);
        while (m.find()) {
            named.add("/" + m.group(1));
        }
        assertThat(named).as("modules named by index.html").isEqualTo(modules);
        assertThat(index).contains("<script type=\"module\" src=\"js/main.js\">");
        // Static imports only, relative to the importing module (no bundler resolves bare names here).
        Pattern importFrom = Pattern.compile("^import\\s[^;]*?from\\s+'([^']+)';", Pattern.MULTILINE | Pattern.DOTALL);
        for (String module : modules) {
            Matcher i = importFrom.matcher(read(module));
            while (i.find()) {
                String target = i.group(1);
                assertThat(target).as("import in %s", module).startsWith("./").endsWith(".js");
                String resolved = module.substring(0, module.lastIndexOf('/') + 1) + target.substring(2);
                assertThat(modules).as("import of %s in %s", target, module).contains(resolved);
            }
        }
    }

    @Test
    void thePageKeepsItsCaution() {
        assertThat(read("/index.html")).contains("not for vehicle control or safety functions");
    }
}
