package org.wayhold.http;

import java.io.ByteArrayOutputStream;
import java.io.IOException;
import java.io.InputStream;
import java.io.OutputStream;
import java.io.UncheckedIOException;
import java.net.InetAddress;
import java.net.Socket;
import java.net.SocketTimeoutException;
import java.nio.charset.StandardCharsets;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.regex.Matcher;
import java.util.regex.Pattern;

/**
 * An HTTP/1.1 client over a plain socket that sends exactly the bytes it is given, for requests the JDK
 * client refuses to make: wrong or duplicate {@code Content-Length}, broken chunking, invalid
 * percent-encoding, raw non-ASCII header bytes. Each exchange uses its own connection; the request
 * side is shut after sending so that a body shorter than declared ends in EOF rather than a wait.
 */
final class RawHttp {

    /** One reply: the first response, and the status of any further responses on the same connection. */
    record Reply(int status, Map<String, String> headers, byte[] body, List<Integer> laterStatuses) {
        String header(String name) {
            return headers.get(name.toLowerCase(Locale.ROOT));
        }

        String text() {
            return new String(body, StandardCharsets.UTF_8);
        }

        /** Every status on the connection, the first one included. */
        List<Integer> allStatuses() {
            List<Integer> all = new ArrayList<>();
            all.add(status);
            all.addAll(laterStatuses);
            return all;
        }
    }

    private static final Pattern STATUS_LINE = Pattern.compile("HTTP/1\\.[01] (\\d{3}) ");

    private final int port;

    RawHttp(int port) {
        this.port = port;
    }

    /** Sends the request bytes and reads the whole reply (the connection is closed by the server). */
    Reply exchange(byte[] request) {
        try (Socket s = new Socket(InetAddress.getLoopbackAddress(), port)) {
            s.setSoTimeout(20_000);
            OutputStream out = s.getOutputStream();
            try {
                out.write(request);
                out.flush();
                s.shutdownOutput();
            } catch (IOException e) {
                // The server may answer and close before it has read everything (a 413 on the declared
                // length, say): the reply is already on its way, so read it.
            }
            InputStream in = s.getInputStream();
            ByteArrayOutputStream all = new ByteArrayOutputStream();
            byte[] buf = new byte[16384];
            int n;
            try {
                while ((n = in.read(buf)) >= 0) {
                    all.write(buf, 0, n);
                }
            } catch (SocketTimeoutException e) {
                throw new IllegalStateException("no end of reply within 20 s to: " + preview(request), e);
            } catch (IOException e) {
                // A reset after the reply was sent (the server closed with unread request bytes) is fine.
                if (all.size() == 0) {
                    throw e;
                }
            }
            return parse(all.toByteArray(), request);
        } catch (IOException e) {
            throw new UncheckedIOException("exchange failed for: " + preview(request), e);
        }
    }

    /** Builds a request from a request line, header lines (each "Name: value") and a body. */
    static byte[] request(String requestLine, List<byte[]> headerLines, byte[] body) {
        ByteArrayOutputStream out = new ByteArrayOutputStream(256 + body.length);
        out.writeBytes(requestLine.getBytes(StandardCharsets.ISO_8859_1));
        out.writeBytes(CRLF);
        for (byte[] h : headerLines) {
            out.writeBytes(h);
            out.writeBytes(CRLF);
        }
        out.writeBytes(CRLF);
        out.writeBytes(body);
        return out.toByteArray();
    }

    static byte[] header(String name, String value) {
        return (name + ": " + value).getBytes(StandardCharsets.UTF_8);
    }

    private static final byte[] CRLF = {'\r', '\n'};

    private static Reply parse(byte[] raw, byte[] request) {
        int headEnd = indexOf(raw, "\r\n\r\n".getBytes(StandardCharsets.ISO_8859_1), 0);
        if (headEnd < 0) {
            throw new IllegalStateException("no complete response head (" + raw.length + " bytes) to: "
                    + preview(request));
        }
        String head = new String(raw, 0, headEnd, StandardCharsets.ISO_8859_1);
        String[] lines = head.split("\r\n");
        Matcher m = STATUS_LINE.matcher(lines[0] + " ");
        if (!m.lookingAt()) {
            throw new IllegalStateException("not a status line: " + lines[0]);
        }
        int status = Integer.parseInt(m.group(1));
        Map<String, String> headers = new LinkedHashMap<>();
        for (int i = 1; i < lines.length; i++) {
            int colon = lines[i].indexOf(':');
            if (colon > 0) {
                headers.putIfAbsent(lines[i].substring(0, colon).strip().toLowerCase(Locale.ROOT),
                        lines[i].substring(colon + 1).strip());
            }
        }
        int bodyStart = headEnd + 4;
        byte[] body;
        int rest;
        String length = headers.get("content-length");
        if (length != null) {
            int len = Integer.parseInt(length);
            body = java.util.Arrays.copyOfRange(raw, bodyStart, Math.min(raw.length, bodyStart + len));
            rest = Math.min(raw.length, bodyStart + len);
        } else if ("chunked".equalsIgnoreCase(headers.get("transfer-encoding"))) {
            ByteArrayOutputStream b = new ByteArrayOutputStream();
            int p = bodyStart;
            while (true) {
                int eol = indexOf(raw, CRLF, p);
                if (eol < 0) {
                    break;
                }
                String sizeText = new String(raw, p, eol - p, StandardCharsets.ISO_8859_1).split(";")[0].strip();
                int size = Integer.parseInt(sizeText, 16);
                p = eol + 2;
                if (size == 0) {
                    int end = indexOf(raw, "\r\n".getBytes(StandardCharsets.ISO_8859_1), p);
                    p = end < 0 ? raw.length : end + 2;
                    break;
                }
                b.write(raw, p, Math.min(size, raw.length - p));
                p += size + 2;
            }
            body = b.toByteArray();
            rest = Math.min(p, raw.length);
        } else {
            body = java.util.Arrays.copyOfRange(raw, bodyStart, raw.length);
            rest = raw.length;
        }
        List<Integer> later = new ArrayList<>();
        Matcher more = STATUS_LINE.matcher(new String(raw, rest, raw.length - rest, StandardCharsets.ISO_8859_1));
        while (more.find()) {
            later.add(Integer.parseInt(more.group(1)));
        }
        return new Reply(status, headers, body, later);
    }

    private static int indexOf(byte[] hay, byte[] needle, int from) {
        outer:
        for (int i = from; i <= hay.length - needle.length; i++) {
            for (int j = 0; j < needle.length; j++) {
                if (hay[i + j] != needle[j]) {
                    continue outer;
                }
            }
            return i;
        }
        return -1;
    }

    private static String preview(byte[] request) {
        String s = new String(request, 0, Math.min(request.length, 300), StandardCharsets.ISO_8859_1);
        return s.replace("\r", "\\r").replace("\n", "\\n") + (request.length > 300 ? "..." : "");
    }
}
