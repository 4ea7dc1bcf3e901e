package org.wayhold.report;

import java.util.List;
import java.util.Locale;
import org.wayhold.calibration.CalibrationResult;
import org.wayhold.calibration.DriveSupport;
import org.wayhold.calibration.Estimate;
import org.wayhold.calibration.HoldOut;
import org.wayhold.calibration.Parameter;
import org.wayhold.scoring.LengthSummary;

/**
 * The plain-text report {@code calibrate} writes beside the profile: what was fitted and how well the
 * data supports it, and drift and honesty on held-out driving with the configured and the calibrated
 * settings side by side.
 */
public final class CalibrationReport {

    private CalibrationReport() {
    }

    /**
     * What the report describes besides the fit.
     *
     * @param version     the tool's version and commit
     * @param commandLine the command as given
     * @param inputs      one line per log (name, samples, rejected lines)
     * @param holdOutShare share of each drive held out (0..1)
     * @param seconds     wall time of the calibration (s)
     */
    public record Context(String version, String commandLine, List<String> inputs, double holdOutShare,
                          double seconds) {
    }

    /** The report's text. */
    public static String text(Context c, CalibrationResult r, HoldOut.Result holdOut) {
        StringBuilder b = new StringBuilder();
        line(b, "wayhold calibration report");
        line(b, "==========================");
        line(b, "");
        line(b, "CAUTION: " + HtmlReport.CAUTION + " A fitted profile is an estimate from these drives: check it");
        line(b, "against the held-out figures below and against measurements of the vehicle before relying on it.");
        line(b, "");
        line(b, "tool: " + c.version());
        line(b, "command: " + c.commandLine());
        for (String in : c.inputs()) {
            line(b, "input: " + in);
        }
        f(b, "fit on the first %.0f %% of each drive; the rest is held out for the comparison below", 100 * (1 - c.holdOutShare()));
        DriveSupport s = r.support();
        f(b, "fitted driving: %.0f s moving, %.1f km, %d fixes, %.0f deg turned, %.0f s turning, %.0f s above 3 m/s "
                + "(speed spread %.1f m/s)", s.movingS(), s.distanceM() / 1000.0, s.fixes(), s.turnedDeg(), s.turningS(),
                s.fastS(), s.speedSpreadMps());
        line(b, "");
        line(b, "Method");
        line(b, "------");
        line(b, "Maximum likelihood of the filter's position innovations (prediction-error decomposition: Schweppe,");
        line(b, "IEEE Trans. Information Theory 11(1), 1965; Harvey, Forecasting, structural time series models and");
        line(b, "the Kalman filter, 1989, ch. 3), each evaluation a replay of the drives through the filter the service");
        line(b, "runs, over the fixes the filter accepted at the start (after a 30 s warm-up), maximised by BOBYQA");
        line(b, "(Powell 2009). The constants are filter states: their estimates are the filter's converged states");
        line(b, "under the fitted noise, with the filter's own 1-sigma. Reading noise comes from the readings'");
        line(b, "second differences (variate difference method). An estimate is kept only when the data tells it");
        line(b, "apart from a value one resolution away (ln L falls by 1.92 nats, or the 1-sigma is below");
        line(b, "resolution / 1.96); otherwise the configured value stays.");
        f(b, "ln L %.2f at the start, %.2f at the estimate, over %d fixes in %d evaluations; mean NIS %.2f configured, "
                + "%.2f calibrated (2 for a consistent filter)", r.startLogLikelihood(), r.logLikelihood(),
                r.countedFixes(), r.evaluations(), r.configuredMeanNis(), r.calibratedMeanNis());
        line(b, "");
        line(b, "Estimates");
        line(b, "---------");
        f(b, "%-32s %14s %14s %12s %10s  %s", "parameter", "configured", "estimate", "1-sigma", "ln L drop", "written");
        for (Parameter p : Parameter.values()) {
            Estimate e = r.estimate(p);
            f(b, "%-32s %14s %14s %12s %10s  %s", p.label() + unit(p), num(e.configured()), num(e.fitted()),
                    num(e.standardError()), Double.isNaN(e.drop()) ? "-" : String.format(Locale.ROOT, "%.1f", e.drop()),
                    e.kept() ? "estimate" : "configured");
        }
        f(b, "%-32s %14s %14s %12s %10s  %s", "wheel-speed reading noise (m/s)", num(r.configuredWheelNoiseMps()),
                num(r.wheelNoiseMps()), "-", String.format(Locale.ROOT, "%.1f", r.wheelFlatness()), "estimate");
        f(b, "%-32s %14s %14s %12s %10s  %s", "yaw-rate reading noise (rad/s)", num(r.configuredGyroNoiseRadPerS()),
                num(r.gyroNoiseRadPerS()), "-", String.format(Locale.ROOT, "%.1f", r.gyroFlatness()), "estimate");
        f(b, "gyro bias, mean over the second half of each drive: %.4f deg/s (reported only: a bias changes from one "
                + "power-on to the next and the filter learns it online)", Math.toDegrees(r.gyroBiasRadPerS()));
        line(b, "(the reading noises' ln L drop is for a factor of 1.5: near zero means the innovations cannot see it)");
        boolean any = false;
        for (Parameter p : Parameter.values()) {
            Estimate e = r.estimate(p);
            if (!e.kept()) {
                if (!any) {
                    line(b, "");
                    line(b, "Left at the configured value");
                    line(b, "----------------------------");
                    any = true;
                }
                line(b, p.label() + ": " + e.note());
            }
        }
        for (String n : r.notes()) {
            line(b, n);
        }
        line(b, "");
        line(b, "Held-out driving: configured vs calibrated");
        line(b, "------------------------------------------");
        if (holdOut == null) {
            line(b, "nothing held out (--hold-out 0): the profile was not checked on driving the fit did not see");
        } else {
            f(b, "%d held-out parts scored as score does (GNSS withheld in outage windows, error against the "
                    + "reference lines or the withheld fixes)", holdOut.scored());
            f(b, "%8s %8s | %-36s | %-36s", "outage", "windows", "configured: median/p95 m, inside95",
                    "calibrated: median/p95 m, inside95");
            for (HoldOut.Row row : holdOut.rows()) {
                f(b, "%6.0f s %8d | %-36s | %-36s", row.lengthS(), row.calibrated().count(), summary(row.configured()),
                        summary(row.calibrated()));
            }
            for (String n : holdOut.notes()) {
                line(b, n);
            }
            line(b, "(inside95 is the share of time the truth lay inside the 95 % ellipse: about 0.95 when honest)");
        }
        line(b, "");
        f(b, "calibration took %.1f s", c.seconds());
        return b.toString();
    }

    private static String summary(LengthSummary s) {
        if (s.count() == 0) {
            return "no window";
        }
        return String.format(Locale.ROOT, "%.2f / %.2f m, %.2f", s.medianFinalErrorM(), s.p95FinalErrorM(), s.inside95());
    }

    private static String unit(Parameter p) {
        return p.unitName().isEmpty() ? "" : " (" + p.unitName() + ")";
    }

    private static String num(double v) {
        return Double.isNaN(v) ? "-" : String.format(Locale.ROOT, "%.6g", v);
    }

    private static void f(StringBuilder b, String format, Object... args) {
        line(b, String.format(Locale.ROOT, format, args));
    }

    private static void line(StringBuilder b, String s) {
        b.append(s).append('\n');
    }
}
