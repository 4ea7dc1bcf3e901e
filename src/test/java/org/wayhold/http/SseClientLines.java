package org.wayhold.http;

import java.io.BufferedReader;
import java.io.IOException;
import java.io.InputStream;
import java.io.InputStreamReader;
import java.net.http.HttpRequest;
import java.net.http.HttpResponse;
import java.nio.charset.StandardCharsets;
import java.util.concurrent.BlockingQueue;
import java.util.concurrent.LinkedBlockingQueue;
import java.util.concurrent.TimeUnit;

/** Reads an event stream line by line on a thread of its own; the end of the stream is {@link #END}. */
final class SseClientLines implements AutoCloseable {

    static final String END = "\u0000end";
    static final String FAILED = "\u0000failed";

    final int status;
    final String contentType;
    private final InputStream body;
    private final BlockingQueue<String> lines = new LinkedBlockingQueue<>();
    private final Thread reader;

    SseClientLines(LiveServer server, String path) throws IOException, InterruptedException {
        this(server, path, java.util.Map.of("Accept", "text/event-stream"));
    }

    /** A stream asked with exactly these request headers (none: no Accept at all). */
    SseClientLines(LiveServer server, String path, java.util.Map<String, String> headers)
            throws IOException, InterruptedException {
        HttpRequest.Builder b = server.request(path);
        headers.forEach(b::header);
        HttpResponse<InputStream> r = server.client.send(b.GET().build(), HttpResponse.BodyHandlers.ofInputStream());
        this.status = r.statusCode();
        this.contentType = r.headers().firstValue("Content-Type").orElse("");
        this.body = r.body();
        this.reader = new Thread(() -> {
            try (BufferedReader in = new BufferedReader(new InputStreamReader(body, StandardCharsets.UTF_8))) {
                String line;
                while ((line = in.readLine()) != null) {
                    lines.add(line);
                }
                lines.add(END);
            } catch (IOException e) {
                lines.add(FAILED);
            }
        }, "sse-test-reader");
        reader.setDaemon(true);
        reader.start();
    }

    /** The next line, or null when none came within the bound (a generous bound, not a timing check). */
    String next() throws InterruptedException {
        return lines.poll(10, TimeUnit.SECONDS);
    }

    /**
     * Skips lines until one starts with the prefix and returns it; returns the end marker, or null when
     * no line came within the bound or 1000 lines went by without one.
     */
    String nextStartingWith(String prefix) throws InterruptedException {
        String line;
        for (int i = 0; i < 1000 && (line = next()) != null; i++) {
            if (line.startsWith(prefix) || line.equals(END) || line.equals(FAILED)) {
                return line;
            }
        }
        return null;
    }

    /** The next event (fields until a blank line, comments skipped) as name to value, empty at the end. */
    java.util.Map<String, String> nextEvent() throws InterruptedException {
        java.util.Map<String, String> fields = new java.util.LinkedHashMap<>();
        String line;
        for (int i = 0; i < 1000 && (line = next()) != null && !line.equals(END) && !line.equals(FAILED); i++) {
            if (line.isEmpty()) {
                if (!fields.isEmpty()) {
                    return fields;
                }
            } else if (!line.startsWith(":")) {
                int colon = line.indexOf(':');
                fields.put(line.substring(0, colon), line.substring(colon + 1).strip());
            }
        }
        return fields;
    }

    @Override
    public void close() throws IOException {
        body.close();
    }
}
