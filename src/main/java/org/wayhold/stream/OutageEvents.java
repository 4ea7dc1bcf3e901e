package org.wayhold.stream;

import java.io.DataInput;
import java.io.DataOutput;
import java.io.IOException;
import java.util.ArrayList;
import java.util.List;
import org.wayhold.http.PoseJson;
import org.wayhold.pose.NavState;
import org.wayhold.pose.Pose;

/**
 * Outage events derived from the poses a vehicle's stream gives, in order: {@code outage_start} when a
 * pose first shows an active outage, {@code unreliable} when a pose inside the outage first turns
 * {@code unreliable}, and {@code outage_end} when a pose shows the outage over. The end carries the
 * gap's length (from the last usable fix before it to the fix that ended it, s) and the distance
 * driven (m) as the last pose inside the gap gave it, at most {@code history.interval_s} before the
 * end. Mutable: the memory of the outage in progress is part of the vehicle's state.
 */
final class OutageEvents {

    /** What is remembered between poses; a vehicle outside an outage remembers nothing more. */
    private boolean active;
    private boolean unreliable;
    private double sinceT = Double.NaN;
    private double seconds;
    private double meters;

    /** The events one pose causes, as JSON documents (UTF-8), oldest first. */
    List<byte[]> next(String vehicleId, Pose p) {
        List<byte[]> events = new ArrayList<>(1);
        if (p.outage().active()) {
            if (!active) {
                active = true;
                unreliable = false;
                sinceT = p.outage().sinceT();
                events.add(event(vehicleId, "outage_start", p, p.outage().seconds(), p.outage().meters()));
            }
            seconds = p.outage().seconds();
            meters = p.outage().meters();
            if (p.state() == NavState.UNRELIABLE && !unreliable) {
                unreliable = true;
                events.add(event(vehicleId, "unreliable", p, seconds, meters));
            }
        } else if (active) {
            double lengthS = Double.isFinite(p.lastFixT()) ? p.lastFixT() - sinceT : seconds;
            events.add(event(vehicleId, "outage_end", p, lengthS, meters));
            active = false;
            unreliable = false;
            sinceT = Double.NaN;
            seconds = 0.0;
            meters = 0.0;
        }
        return events;
    }

    /**
     * One event: {@code vehicle}, {@code event}, {@code t} (s, vehicle clock, the pose that shows it),
     * {@code since} (s, the last usable fix before the gap), {@code length_s} (s) and {@code distance_m}
     * (m) so far (for the end: the whole gap), {@code state}, {@code lat}, {@code lon} (degrees) and
     * {@code radius95} (m) of that pose.
     */
    private byte[] event(String vehicleId, String name, Pose p, double lengthS, double distanceM) {
        return PoseJson.document(256, g -> {
            g.writeStartObject();
            g.writeStringField("vehicle", vehicleId);
            g.writeStringField("event", name);
            PoseJson.number(g, "t", p.t());
            PoseJson.number(g, "since", sinceT);
            PoseJson.number(g, "length_s", lengthS);
            PoseJson.number(g, "distance_m", distanceM);
            g.writeStringField("state", p.state().wireName());
            PoseJson.number(g, "lat", p.latDeg());
            PoseJson.number(g, "lon", p.lonDeg());
            PoseJson.number(g, "radius95", p.radius95M());
            g.writeEndObject();
        });
    }

    void write(DataOutput out) throws IOException {
        out.writeBoolean(active);
        out.writeBoolean(unreliable);
        out.writeDouble(sinceT);
        out.writeDouble(seconds);
        out.writeDouble(meters);
    }

    void read(DataInput in) throws IOException {
        active = in.readBoolean();
        unreliable = in.readBoolean();
        sinceT = in.readDouble();
        seconds = in.readDouble();
        meters = in.readDouble();
    }
}
