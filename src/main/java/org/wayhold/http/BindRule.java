package org.wayhold.http;

import java.net.InetAddress;
import java.net.UnknownHostException;
import java.util.ArrayList;
import java.util.List;
import org.wayhold.settings.ServerSettings;

/**
 * The start-up rule for the listening address: the service listens on loopback by default, and an
 * address other hosts can reach needs write tokens, or else an explicit {@code --insecure}, so that a
 * service is never opened to a network for anyone to write by accident.
 */
public final class BindRule {

    /** Tokens shorter than this (characters) get a warning: they are easy to guess. */
    static final int SHORT_TOKEN_CHARS = 16;

    /** Thrown when the address is refused; the message says why and what to do. */
    public static final class Refused extends RuntimeException {
        Refused(String message) {
            super(message, null, false, false);
        }
    }

    private BindRule() {
    }

    /**
     * Checks the settings before the service starts.
     *
     * @param server   the server settings (address and tokens)
     * @param insecure true when the operator asked to listen on a non-loopback address without tokens
     * @return warnings to show the operator (never a token itself); empty when all is well
     * @throws Refused when {@code server.bind} is not a loopback address, there are no write tokens and
     *                 {@code insecure} is false, or when the address cannot be resolved
     */
    public static List<String> check(ServerSettings server, boolean insecure) {
        List<String> warnings = new ArrayList<>();
        boolean loopback = isLoopback(server.bind());
        if (!loopback && !server.writesNeedToken()) {
            if (!insecure) {
                throw new Refused("server.bind: " + server.bind() + " is not a loopback address and no write"
                        + " tokens are configured, so anyone who can reach it could write and delete; set"
                        + " server.write_tokens (or WAYHOLD_WRITE_TOKENS), or pass --insecure to accept that");
            }
            warnings.add("WARNING: --insecure: listening on " + server.bind() + " without write tokens;"
                    + " anyone who can reach this address can write and delete vehicles");
        }
        if (!loopback && server.writesNeedToken() && !server.readsNeedToken()) {
            warnings.add("note: no read tokens are configured, so poses on " + server.bind()
                    + " can be read without a token");
        }
        if (!server.writesNeedToken() && server.readsNeedToken()) {
            warnings.add("WARNING: read tokens are configured but no write tokens: writes are not checked");
        }
        warnings.addAll(shortTokens("server.write_tokens", server.writeTokens()));
        warnings.addAll(shortTokens("server.read_tokens", server.readTokens()));
        return warnings;
    }

    /** True when the address (a literal or a host name) is a loopback address. */
    static boolean isLoopback(String bind) {
        try {
            return InetAddress.getByName(bind).isLoopbackAddress();
        } catch (UnknownHostException e) {
            throw new Refused("server.bind: cannot resolve '" + bind + "' to an address");
        }
    }

    private static List<String> shortTokens(String key, List<String> tokens) {
        List<String> w = new ArrayList<>();
        for (int i = 0; i < tokens.size(); i++) {
            if (tokens.get(i).length() < SHORT_TOKEN_CHARS) {
                w.add("WARNING: " + key + ": item " + (i + 1) + " is shorter than " + SHORT_TOKEN_CHARS
                        + " characters and easy to guess");
            }
        }
        return w;
    }
}
