package org.wayhold.accuracy;

import org.wayhold.scoring.ReferenceTrack;
import org.wayhold.simulate.SimulatedDrive;
import org.wayhold.simulate.Truth;

/** The simulator's truth as a scoring reference, in the drive's own ENU frame. */
final class SimulatedReference implements ReferenceTrack {
    private final SimulatedDrive drive;

    SimulatedReference(SimulatedDrive drive) {
        this.drive = drive;
    }

    @Override
    public boolean covers(double tS) {
        return tS >= drive.startT() && tS <= drive.endT();
    }

    @Override
    public double eastAt(double tS) {
        return drive.truthAt(tS).eastM();
    }

    @Override
    public double northAt(double tS) {
        return drive.truthAt(tS).northM();
    }

    @Override
    public double yawAt(double tS) {
        Truth t = drive.truthAt(tS);
        return t.speedMps() < 0 ? t.yawRad() + Math.PI : t.yawRad();
    }
}
