package org.wayhold.tracks;

import java.io.BufferedOutputStream;
import java.io.IOException;
import java.io.OutputStream;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import javax.xml.stream.XMLOutputFactory;
import javax.xml.stream.XMLStreamException;
import javax.xml.stream.XMLStreamWriter;
import org.wayhold.BuildInfo;
import org.wayhold.fusion.FusedDrive;
import org.wayhold.fusion.FusedPoint;

/**
 * Writes a fused drive as GPX 1.1 (the GPS Exchange Format schema, namespace
 * {@value #GPX_NAMESPACE}): one {@code trk} per estimate, named {@code forward} and {@code smoothed},
 * each point a {@code trkpt} with its latitude and longitude (WGS-84, degrees), {@code ele}
 * (ellipsoidal height, m) and {@code time} (UTC). What GPX has no element for goes into the point's
 * {@code extensions}, in this project's namespace {@value #NAMESPACE} (GPX 1.1 allows elements of any
 * other namespace there): ENU position, heading, covariance, 95% ellipse and radius, state, reasons and
 * whether the point lies in a gap, each element named with its unit.
 *
 * <p>Points without a geodetic position (no fix yet) cannot be written and split the track into
 * segments ({@code trkseg}), as does nothing else.
 */
public final class TrackGpx {

    /** The GPX 1.1 namespace. */
    public static final String GPX_NAMESPACE = "http://www.topografix.com/GPX/1/1";
    /** The namespace of this project's extension elements. */
    public static final String NAMESPACE = "urn:wayhold:track:1";
    private static final String PREFIX = "wh";

    private TrackGpx() {
    }

    public static void write(FusedDrive drive, Path file) throws IOException {
        try (OutputStream out = new BufferedOutputStream(Files.newOutputStream(file), 1 << 16)) {
            XMLStreamWriter w = XMLOutputFactory.newFactory().createXMLStreamWriter(out, "UTF-8");
            w.writeStartDocument("UTF-8", "1.0");
            w.writeCharacters("\n");
            w.setDefaultNamespace(GPX_NAMESPACE);
            w.setPrefix(PREFIX, NAMESPACE);
            w.writeStartElement(GPX_NAMESPACE, "gpx");
            w.writeDefaultNamespace(GPX_NAMESPACE);
            w.writeNamespace(PREFIX, NAMESPACE);
            w.writeAttribute("version", "1.1");
            w.writeAttribute("creator", "wayhold " + BuildInfo.current().version());
            w.writeCharacters("\n");
            w.writeStartElement(GPX_NAMESPACE, "metadata");
            text(w, "name", drive.name());
            text(w, "desc", "Fused by wayhold: the forward filter's track" + (drive.smoothed().isEmpty() ? ""
                    : " and the Rauch-Tung-Striebel smoothed track") + ". Estimates, not for vehicle control or "
                    + "safety functions.");
            FusedPoint first = drive.forward().stream().filter(FusedPoint::placed).findFirst().orElse(null);
            if (first != null) {
                text(w, "time", TrackValues.utc(first.t()));
            }
            w.writeEndElement();
            w.writeCharacters("\n");
            track(w, "forward", drive.forward());
            if (!drive.smoothed().isEmpty()) {
                track(w, "smoothed", drive.smoothed());
            }
            w.writeEndElement();
            w.writeCharacters("\n");
            w.writeEndDocument();
            w.close();
        } catch (XMLStreamException e) {
            throw new IOException("GPX: " + e.getMessage(), e);
        }
    }

    private static void track(XMLStreamWriter w, String name, List<FusedPoint> points) throws XMLStreamException {
        w.writeStartElement(GPX_NAMESPACE, "trk");
        text(w, "name", name);
        boolean inSegment = false;
        for (FusedPoint p : points) {
            if (!p.placed()) {
                if (inSegment) {
                    w.writeEndElement();
                    inSegment = false;
                }
                continue;
            }
            if (!inSegment) {
                w.writeCharacters("\n");
                w.writeStartElement(GPX_NAMESPACE, "trkseg");
                inSegment = true;
            }
            w.writeCharacters("\n");
            point(w, p);
        }
        if (inSegment) {
            w.writeEndElement();
        }
        w.writeEndElement();
        w.writeCharacters("\n");
    }

    private static void point(XMLStreamWriter w, FusedPoint p) throws XMLStreamException {
        w.writeStartElement(GPX_NAMESPACE, "trkpt");
        w.writeAttribute("lat", TrackValues.text(p.latDeg(), TrackValues.DEG_DECIMALS));
        w.writeAttribute("lon", TrackValues.text(p.lonDeg(), TrackValues.DEG_DECIMALS));
        if (Double.isFinite(p.heightM())) {
            text(w, "ele", TrackValues.text(p.heightM(), 3));
        }
        text(w, "time", TrackValues.utc(p.t()));
        w.writeStartElement(GPX_NAMESPACE, "extensions");
        ext(w, "t_s", TrackValues.text(p.t(), 3));
        ext(w, "east_m", TrackValues.text(p.eastM(), TrackValues.M_DECIMALS));
        ext(w, "north_m", TrackValues.text(p.northM(), TrackValues.M_DECIMALS));
        ext(w, "up_m", TrackValues.text(p.upM(), TrackValues.M_DECIMALS));
        ext(w, "heading_deg", TrackValues.text(p.headingDeg(), 4));
        ext(w, "heading_sigma_deg", TrackValues.text(p.headingSigmaDeg(), 4));
        ext(w, "speed_mps", TrackValues.text(p.speedMps(), 4));
        ext(w, "cov_ee_m2", TrackValues.text(p.covEastEastM2(), 6));
        ext(w, "cov_en_m2", TrackValues.text(p.covEastNorthM2(), 6));
        ext(w, "cov_nn_m2", TrackValues.text(p.covNorthNorthM2(), 6));
        ext(w, "semi_major_m", TrackValues.text(p.ellipse95().semiMajorM(), TrackValues.M_DECIMALS));
        ext(w, "semi_minor_m", TrackValues.text(p.ellipse95().semiMinorM(), TrackValues.M_DECIMALS));
        ext(w, "orientation_deg", TrackValues.text(p.ellipse95().orientationDeg(), 4));
        ext(w, "radius95_m", TrackValues.text(p.radius95M(), TrackValues.M_DECIMALS));
        ext(w, "state", p.state().wireName());
        ext(w, "reasons", TrackValues.reasons(p, " "));
        ext(w, "in_gap", Boolean.toString(p.inGap()));
        w.writeEndElement();
        w.writeEndElement();
    }

    private static void text(XMLStreamWriter w, String name, String value) throws XMLStreamException {
        w.writeStartElement(GPX_NAMESPACE, name);
        w.writeCharacters(value);
        w.writeEndElement();
    }

    private static void ext(XMLStreamWriter w, String name, String value) throws XMLStreamException {
        if (value.isEmpty()) {
            return;
        }
        w.writeStartElement(NAMESPACE, name);
        w.writeCharacters(value);
        w.writeEndElement();
    }
}
