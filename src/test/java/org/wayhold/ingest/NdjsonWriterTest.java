package org.wayhold.ingest;

import static org.assertj.core.api.Assertions.assertThat;

import java.io.ByteArrayInputStream;
import java.io.ByteArrayOutputStream;
import java.io.IOException;
import java.io.InputStream;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Random;
import java.util.zip.GZIPInputStream;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.wayhold.sample.FixType;
import org.wayhold.sample.GnssFix;
import org.wayhold.sample.ReferencePoint;
import org.wayhold.sample.Sample;
import org.wayhold.sample.WheelSpeed;
import org.wayhold.sample.YawRate;

/** Writing samples and reading them back; the writer's output is also checked as text. */
class NdjsonWriterTest {

    @TempDir
    Path dir;

    private static String write(List<Sample> samples) throws IOException {
        ByteArrayOutputStream bytes = new ByteArrayOutputStream();
        try (NdjsonWriter w = new NdjsonWriter(bytes)) {
            for (Sample s : samples) {
                w.write(s);
            }
        }
        return bytes.toString(StandardCharsets.UTF_8);
    }

    private static List<Sample> readBack(String text) {
        // Wide bounds: the generated values reach beyond the physical defaults on purpose.
        ReadResult r = WideLimits.reader().readAll(new ByteArrayInputStream(text.getBytes(StandardCharsets.UTF_8)));
        assertThat(r.rejected()).isEmpty();
        return r.samples();
    }

    @Test
    void eachSampleIsOneLineWithTheContractFieldNames() throws IOException {
        String text = write(List.of(
                new GnssFix(5.0, 48.5, 11.25, 600.0, 1.5, 3.0, FixType.DGNSS, 9, 0.75, 12.5, 90.0),
                new WheelSpeed(5.0, -1.5),
                new YawRate(5.0, 0.25),
                new ReferencePoint(5.0, 48.5, 11.25, 600.0, 45.0)));
        assertThat(text).isEqualTo("""
                {"type":"gnss","t":5.0,"lat":48.5,"lon":11.25,"alt":600.0,"sigma_h":1.5,"sigma_v":3.0,\
                "fix":"dgnss","sats":9,"hdop":0.75,"speed":12.5,"course":90.0}
                {"type":"wheel_speed","t":5.0,"speed":-1.5}
                {"type":"yaw_rate","t":5.0,"rate":0.25}
                {"type":"reference","t":5.0,"lat":48.5,"lon":11.25,"alt":600.0,"heading":45.0}
                """);
    }

    @Test
    void optionalFieldsThatAreNotGivenAreLeftOut() throws IOException {
        String text = write(List.of(GnssFix.position(1.0, 2.0, 3.0, Double.NaN),
                new ReferencePoint(1.0, 2.0, 3.0, Double.NaN, Double.NaN)));
        assertThat(text).isEqualTo("""
                {"type":"gnss","t":1.0,"lat":2.0,"lon":3.0,"fix":"3d"}
                {"type":"reference","t":1.0,"lat":2.0,"lon":3.0}
                """);
        assertThat(readBack(text)).containsExactly(GnssFix.position(1.0, 2.0, 3.0, Double.NaN),
                new ReferencePoint(1.0, 2.0, 3.0, Double.NaN, Double.NaN));
    }

    @Test
    void anEpochTimeWithMicrosecondsRoundTripsExactly() throws IOException {
        // 1799999999.123456 needs 16 significant digits; a float or a fixed 3-decimal format would lose it.
        double t = 1799999999.123456;
        String text = write(List.of(new WheelSpeed(t, 1.0)));
        assertThat(text).contains("\"t\":1.799999999123456E9");
        List<Sample> back = readBack(text);
        assertThat(Double.doubleToRawLongBits(back.get(0).t())).isEqualTo(Double.doubleToRawLongBits(t));
    }

    @Test
    void seededRandomSamplesRoundTripBitForBit() throws IOException {
        // Double.toString promises digits that single out the value among its neighbours (Java SE 17 API
        // docs, Double.toString(double)); this checks the writer and reader keep that promise end to end,
        // including values with 17 significant digits, negative zero and subnormals.
        Random random = new Random(20240611L);
        List<Sample> samples = new ArrayList<>();
        for (int i = 0; i < 2000; i++) {
            double t = 1.7e9 + random.nextDouble() * 1e8;
            samples.add(new GnssFix(t, random.nextDouble() * 180 - 90, random.nextDouble() * 360 - 180,
                    random.nextGaussian() * 1000, random.nextDouble() * 10, Double.MIN_VALUE * (i + 1),
                    FixType.values()[i % FixType.values().length], i % 40, random.nextDouble() * 5,
                    random.nextDouble() * 60, random.nextDouble() * 360));
            samples.add(new WheelSpeed(t, i == 0 ? -0.0 : random.nextGaussian() * 30));
            samples.add(new YawRate(t, random.nextGaussian() * 1e-3));
            samples.add(new ReferencePoint(t, random.nextDouble() * 180 - 90, random.nextDouble() * 360 - 180,
                    random.nextGaussian(), random.nextDouble() * 360));
        }
        List<Sample> back = readBack(write(samples));
        // Record equality compares double components with Double.compare, which tells -0.0 from 0.0.
        assertThat(back).isEqualTo(samples);
    }

    @Test
    void aGzipFileRoundTripsAndIsReallyCompressed() throws IOException {
        Path file = dir.resolve("drive.ndjson.gz");
        List<Sample> samples = List.of(new WheelSpeed(1.0, 2.0), new YawRate(1.5, -0.5));
        try (NdjsonWriter w = NdjsonWriter.open(file)) {
            for (Sample s : samples) {
                w.write(s);
            }
        }
        try (InputStream in = new GZIPInputStream(Files.newInputStream(file))) {
            assertThat(new String(in.readAllBytes(), StandardCharsets.UTF_8))
                    .startsWith("{\"type\":\"wheel_speed\"");
        }
        assertThat(readFile(file).samples()).isEqualTo(samples);
    }

    @Test
    void aPlainFileIsReadAndAGzipFileIsRecognisedByItsMagicBytesWhateverItsName() throws IOException {
        Path plain = dir.resolve("drive.ndjson");
        Path gzipped = dir.resolve("drive.gz");
        List<Sample> samples = List.of(new WheelSpeed(1.0, 2.0), new YawRate(1.5, -0.5));
        for (Path p : List.of(plain, gzipped)) {
            try (NdjsonWriter w = NdjsonWriter.open(p)) {
                for (Sample s : samples) {
                    w.write(s);
                }
            }
        }
        assertThat(Files.readString(plain)).startsWith("{\"type\":\"wheel_speed\"");
        Path misnamed = dir.resolve("misnamed.ndjson");
        Files.copy(gzipped, misnamed);
        // RFC 1952 section 2.3.1: ID1 = 0x1f, ID2 = 0x8b start every gzip member.
        assertThat(Files.readAllBytes(misnamed)).startsWith((byte) 0x1f, (byte) 0x8b);
        assertThat(readFile(plain).samples()).isEqualTo(samples);
        assertThat(readFile(misnamed).samples()).isEqualTo(samples);
    }

    private static ReadResult readFile(Path p) throws IOException {
        return NdjsonReader.readFileAll(p);
    }
}
