package org.wayhold.http;

import io.javalin.config.JavalinConfig;
import io.javalin.http.staticfiles.Location;
import java.util.regex.Pattern;

/**
 * The live view: the page's files, kept on the classpath under {@code web/} (HTML, CSS and native
 * JavaScript modules under {@code web/js/}, no build step), served at {@code /}.
 *
 * <p>The files hold no data and no secret, so they are served without a token even when reads need
 * one: the page must load in order to ask for the token, which it then sends on every data request.
 * Only names of existing files of the page are open; any other path is still checked first, so an
 * unknown path says nothing about the server without a token.
 *
 * <p>Types are set here rather than left to the server's defaults: browsers run a module only when it
 * comes with a JavaScript type (HTML Living Standard, "fetch a single module script": the MIME type
 * must be a JavaScript MIME type essence, {@code text/javascript} per RFC 9239).
 */
final class LiveView {

    /** Classpath folder of the page's files. */
    static final String CLASSPATH_DIR = "/web";

    /**
     * Paths the page's files may have: lower-case names of letters, digits and hyphens in folders of
     * the same, ending in .html, .js or .css. No dot segments, no percent-escapes, no other files.
     */
    private static final Pattern PAGE_FILE = Pattern.compile("/(?:[a-z0-9-]+/)*[a-z0-9-]+\\.(?:html|js|css)");

    private LiveView() {
    }

    /** Serves {@code web/} at {@code /} with explicit UTF-8 types for the page's three kinds of file. */
    static void serve(JavalinConfig config) {
        config.staticFiles.add(files -> {
            files.hostedPath = "/";
            files.directory = CLASSPATH_DIR;
            files.location = Location.CLASSPATH;
            files.mimeTypes.add("text/html; charset=utf-8", "html");
            files.mimeTypes.add("text/javascript; charset=utf-8", "js");
            files.mimeTypes.add("text/css; charset=utf-8", "css");
        });
    }

    /** Whether a request path names one of the page's files ({@code /} is its index.html). */
    static boolean isPageFile(String path) {
        if (path.equals("/")) {
            return true;
        }
        return PAGE_FILE.matcher(path).matches() && LiveView.class.getResource(CLASSPATH_DIR + path) != null;
    }
}
