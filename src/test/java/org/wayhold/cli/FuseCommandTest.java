package org.wayhold.cli;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.within;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import io.jenetics.jpx.GPX;
import io.jenetics.jpx.Track;
import io.jenetics.jpx.WayPoint;
import java.io.PrintWriter;
import java.io.StringWriter;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Instant;
import java.util.ArrayList;
import java.util.Iterator;
import java.util.List;
import java.util.Map;
import java.util.Set;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.w3c.dom.Document;
import org.w3c.dom.Node;
import org.wayhold.ingest.NdjsonWriter;
import org.wayhold.sample.Sample;
import org.wayhold.simulate.DriveSimulator;
import org.wayhold.simulate.SimulatedDrive;
import org.wayhold.simulate.SimulationSettings;
import org.wayhold.tracks.TrackCsv;
import org.wayhold.tracks.TrackGpx;
import picocli.CommandLine;

/**
 * {@code wayhold fuse} on a seeded simulated drive with a tunnel, its files read back by outside means:
 * the GPX with the general-purpose GPX library JPX 3.2.1 (io.jenetics) in strict mode, the GeoJSON by
 * structural checks written from RFC 7946 (sections cited beside each check; no JSON schema is used),
 * and the CSV as RFC 4180 text. Every format must hold the same points.
 */
class FuseCommandTest {

    @TempDir
    static Path dir;
    private static Path out;
    private static Run run;
    private static List<Map<String, String>> rows;

    private record Run(int exit, String out, String err) {
    }

    private static Run run(String... args) {
        CommandLine cl = Main.newCommandLine();
        StringWriter o = new StringWriter();
        StringWriter e = new StringWriter();
        cl.setOut(new PrintWriter(o));
        cl.setErr(new PrintWriter(e));
        int exit = cl.execute(args);
        return new Run(exit, o.toString(), e.toString());
    }

    @BeforeAll
    static void fuseOnce() throws Exception {
        SimulatedDrive drive = DriveSimulator.simulate(SimulationSettings.defaults().withMinutes(4).withWarmUpS(90)
                .withTunnelsS(40), 83L);
        Path log = dir.resolve("tunnel.ndjson.gz");
        try (NdjsonWriter w = NdjsonWriter.open(log)) {
            for (Sample s : drive.samples()) {
                w.write(s);
            }
        }
        out = dir.resolve("tracks");
        run = run("fuse", log.toString(), "--smooth", "--out", out.toString());
        rows = csvRows(out.resolve("tunnel.csv"));
    }

    private static List<Map<String, String>> csvRows(Path csv) throws Exception {
        List<String> lines = Files.readAllLines(csv);
        String[] header = lines.get(0).split(",", -1);
        List<Map<String, String>> out = new ArrayList<>();
        for (String line : lines.subList(1, lines.size())) {
            String[] cells = line.split(",", -1);
            assertThat(cells).as("cells of %s", line).hasSameSizeAs(header);
            Map<String, String> row = new java.util.LinkedHashMap<>();
            for (int i = 0; i < header.length; i++) {
                row.put(header[i], cells[i]);
            }
            out.add(row);
        }
        return out;
    }

    private static List<Map<String, String>> placed(String estimate) {
        return rows.stream().filter(r -> r.get("estimate").equals(estimate))
                .filter(r -> !r.get("lat[deg]").isEmpty()).toList();
    }

    @Test
    void writesTheThreeFilesAndSaysWhatItDid() {
        assertThat(run.exit()).as(run.err()).isZero();
        assertThat(run.err()).isEmpty();
        assertThat(out.resolve("tunnel.csv")).exists();
        assertThat(out.resolve("tunnel.geojson")).exists();
        assertThat(out.resolve("tunnel.gpx")).exists();
        assertThat(run.out()).contains("tunnel.ndjson.gz: wrote tunnel.csv, tunnel.geojson, tunnel.gpx")
                .contains("in 1 GNSS gaps").contains("smoothed in 1 segment");
    }

    @Test
    void csvHasAUnitForEveryQuantityAndBothEstimatesPointForPoint() {
        String[] header = TrackCsv.HEADER.split(",");
        Set<String> unitless = Set.of("estimate", "state", "reasons");
        for (String column : header) {
            assertThat(unitless.contains(column) || column.matches("[a-z0-9_]+\\[[^\\]]+\\]"))
                    .as("column %s names its unit", column).isTrue();
        }
        List<Map<String, String>> fwd = rows.stream().filter(r -> r.get("estimate").equals("forward")).toList();
        List<Map<String, String>> sm = rows.stream().filter(r -> r.get("estimate").equals("smoothed")).toList();
        assertThat(fwd).hasSizeGreaterThan(1000).hasSameSizeAs(sm);
        for (int i = 0; i < fwd.size(); i++) {
            assertThat(sm.get(i).get("t[s]")).isEqualTo(fwd.get(i).get("t[s]"));
            assertThat(sm.get(i).get("in_gap[bool]")).isEqualTo(fwd.get(i).get("in_gap[bool]"));
        }
        long inGap = fwd.stream().filter(r -> r.get("in_gap[bool]").equals("true")).count();
        // A 40 s tunnel at a pose every 0.2 s, less the gap threshold: about 190 points.
        assertThat(inGap).isBetween(150L, 210L);
        // In the gap the smoother is more certain than the dead reckoning that it fills.
        double fwdRadius = 0;
        double smRadius = 0;
        for (int i = 0; i < fwd.size(); i++) {
            if (fwd.get(i).get("in_gap[bool]").equals("true")) {
                fwdRadius += Double.parseDouble(fwd.get(i).get("radius95[m]"));
                smRadius += Double.parseDouble(sm.get(i).get("radius95[m]"));
            }
        }
        assertThat(smRadius).isLessThan(0.5 * fwdRadius);
    }

    @Test
    void gpxReadsBackWithAGeneralPurposeGpxLibrary() throws Exception {
        GPX gpx = GPX.Reader.of(GPX.Version.V11, GPX.Reader.Mode.STRICT).read(out.resolve("tunnel.gpx"));
        assertThat(gpx.getVersion()).isEqualTo("1.1");
        assertThat(gpx.getCreator()).startsWith("wayhold");
        assertThat(gpx.getTracks()).extracting(t -> t.getName().orElseThrow()).containsExactly("forward", "smoothed");
        for (Track t : gpx.getTracks()) {
            String estimate = t.getName().orElseThrow();
            List<WayPoint> pts = t.segments().flatMap(s -> s.points()).toList();
            List<Map<String, String>> expected = placed(estimate);
            assertThat(pts).as(estimate).hasSameSizeAs(expected);
            for (int i = 0; i < pts.size(); i++) {
                WayPoint p = pts.get(i);
                Map<String, String> r = expected.get(i);
                // Same decimals in both files (1e-9 degree); JPX parses them as doubles.
                assertThat(p.getLatitude().doubleValue()).isCloseTo(Double.parseDouble(r.get("lat[deg]")), within(1e-12));
                assertThat(p.getLongitude().doubleValue()).isCloseTo(Double.parseDouble(r.get("lon[deg]")), within(1e-12));
                assertThat(p.getElevation().orElseThrow().doubleValue())
                        .isCloseTo(Double.parseDouble(r.get("height[m]")), within(5e-4));
                assertThat(p.getTime().orElseThrow()).isEqualTo(Instant.parse(r.get("time[utc]")));
                // The GPX time is the vehicle clock taken as Unix seconds, to the millisecond.
                assertThat(p.getTime().orElseThrow().toEpochMilli())
                        .isEqualTo(Math.round(Double.parseDouble(r.get("t[s]")) * 1000));
                Document ext = p.getExtensions().orElseThrow();
                assertThat(extension(ext, "east_m")).isEqualTo(r.get("east[m]"));
                assertThat(extension(ext, "state")).isEqualTo(r.get("state"));
                assertThat(extension(ext, "in_gap")).isEqualTo(r.get("in_gap[bool]"));
            }
        }
    }

    private static String extension(Document d, String name) {
        org.w3c.dom.NodeList list = d.getElementsByTagNameNS(TrackGpx.NAMESPACE, name);
        assertThat(list.getLength()).as("extension %s", name).isEqualTo(1);
        Node n = list.item(0);
        return n.getTextContent();
    }

    @Test
    void geoJsonHasTheStructureRfc7946Asks() throws Exception {
        JsonNode root = new ObjectMapper().readTree(out.resolve("tunnel.geojson").toFile());
        // 3.3: a FeatureCollection has "type": "FeatureCollection" and a "features" array.
        assertThat(root.get("type").asText()).isEqualTo("FeatureCollection");
        assertThat(root.get("features").isArray()).isTrue();
        // 4: no "crs" member; coordinates are WGS-84 longitude, latitude (and height).
        assertThat(root.has("crs")).isFalse();
        int lines = 0;
        int points = 0;
        for (JsonNode f : root.get("features")) {
            // 3.2: a Feature has "type": "Feature", a "geometry" member (object or null) and a "properties"
            // member (object or null).
            assertThat(f.get("type").asText()).isEqualTo("Feature");
            assertThat(f.has("geometry") && (f.get("geometry").isObject() || f.get("geometry").isNull())).isTrue();
            assertThat(f.has("properties") && (f.get("properties").isObject() || f.get("properties").isNull())).isTrue();
            assertThat(f.has("crs")).isFalse();
            JsonNode g = f.get("geometry");
            String type = g.get("type").asText();
            switch (type) {
                case "Point" -> {
                    // 3.1.2: the coordinates of a Point are one position.
                    position(g.get("coordinates"));
                    points++;
                }
                case "LineString" -> {
                    // 3.1.4: two or more positions.
                    lineString(g.get("coordinates"));
                    lines++;
                }
                case "MultiLineString" -> {
                    // 3.1.5: an array of LineString coordinate arrays.
                    for (JsonNode part : g.get("coordinates")) {
                        lineString(part);
                    }
                    lines++;
                }
                default -> throw new AssertionError("geometry type " + type + " is not written by fuse");
            }
        }
        assertThat(lines).isEqualTo(2);
        assertThat(points).isEqualTo(placed("forward").size() + placed("smoothed").size());
    }

    private static void lineString(JsonNode coordinates) {
        assertThat(coordinates.isArray()).isTrue();
        assertThat(coordinates.size()).isGreaterThanOrEqualTo(2);
        JsonNode previous = null;
        for (JsonNode p : coordinates) {
            position(p);
            // 3.1.9: a line crossing the antimeridian is cut, so no step spans more than 180 degrees.
            if (previous != null) {
                assertThat(Math.abs(p.get(0).asDouble() - previous.get(0).asDouble())).isLessThanOrEqualTo(180.0);
            }
            previous = p;
        }
    }

    /** 3.1.1: two or three numbers, longitude and latitude first (in degrees, so within their ranges). */
    private static void position(JsonNode p) {
        assertThat(p.isArray()).isTrue();
        assertThat(p.size()).isBetween(2, 3);
        for (Iterator<JsonNode> it = p.elements(); it.hasNext(); ) {
            assertThat(it.next().isNumber()).isTrue();
        }
        assertThat(p.get(0).asDouble()).isBetween(-180.0, 180.0);
        assertThat(p.get(1).asDouble()).isBetween(-90.0, 90.0);
    }

    @Test
    void formatsCanBeChosenAndABadOneIsRefusedByName(@TempDir Path other) throws Exception {
        Path log = dir.resolve("tunnel.ndjson.gz");
        Run onlyGpx = run("fuse", log.toString(), "--format", "gpx", "--out", other.toString());
        assertThat(onlyGpx.exit()).as(onlyGpx.err()).isZero();
        try (var files = Files.list(other)) {
            assertThat(files.map(p -> p.getFileName().toString())).containsExactly("tunnel.gpx");
        }
        GPX gpx = GPX.Reader.of(GPX.Version.V11, GPX.Reader.Mode.STRICT).read(other.resolve("tunnel.gpx"));
        assertThat(gpx.getTracks()).extracting(t -> t.getName().orElseThrow()).containsExactly("forward");
        Run bad = run("fuse", log.toString(), "--format", "kml", "--out", other.toString());
        assertThat(bad.exit()).isEqualTo(2);
        assertThat(bad.err()).contains("--format: 'kml' is none of csv, geojson, gpx");
    }

    @Test
    void aLogWithoutFixesFailsWithOneLineNamingIt(@TempDir Path other) throws Exception {
        Path log = other.resolve("blind.ndjson");
        Files.writeString(log, "{\"type\":\"wheel_speed\",\"t\":1800000000.0,\"speed\":3.0}\n"
                + "{\"type\":\"yaw_rate\",\"t\":1800000000.0,\"rate\":0.0}\n");
        Run r = run("fuse", log.toString(), "--out", other.resolve("o").toString());
        assertThat(r.exit()).isEqualTo(1);
        assertThat(r.err()).contains("blind.ndjson: has no GNSS fix with a solution");
    }
}
