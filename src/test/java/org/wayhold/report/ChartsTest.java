package org.wayhold.report;

import static org.assertj.core.api.Assertions.assertThat;

import java.util.List;
import org.jfree.data.xy.XYSeries;
import org.junit.jupiter.api.Test;

/**
 * Lines are simplified to what the pixels can show, and no more: every point of the full line lies
 * within the tolerance of the simplified one (the defining property of Ramer-Douglas-Peucker, Douglas
 * and Peucker 1973), a straight line keeps its two ends, and breaks (NaN points) stay breaks.
 */
class ChartsTest {

    /** Distance (px) from point p to the polyline of the series' points, all scaled to pixels. */
    private static double distanceToLine(XYSeries s, double x, double y, double sx, double sy) {
        double best = Double.POSITIVE_INFINITY;
        for (int i = 0; i + 1 < s.getItemCount(); i++) {
            double ax = s.getX(i).doubleValue() * sx;
            double ay = s.getY(i).doubleValue() * sy;
            double bx = s.getX(i + 1).doubleValue() * sx;
            double by = s.getY(i + 1).doubleValue() * sy;
            if (Double.isNaN(ax) || Double.isNaN(bx)) {
                continue;
            }
            double dx = bx - ax;
            double dy = by - ay;
            double len2 = dx * dx + dy * dy;
            double u = len2 == 0 ? 0 : Math.max(0, Math.min(1, ((x * sx - ax) * dx + (y * sy - ay) * dy) / len2));
            best = Math.min(best, Math.hypot(x * sx - ax - u * dx, y * sy - ay - u * dy));
        }
        return best;
    }

    @Test
    void everyPointStaysWithinTheToleranceOfTheSimplifiedLine() {
        XYSeries s = Charts.series("error");
        for (int i = 0; i <= 6000; i++) {
            double t = i * 0.01;
            s.add(t, 0.002 * t * t + 0.3 * Math.sin(t));
        }
        double sx = 700.0 / 60.0;
        double sy = 300.0 / 8.0;
        XYSeries simple = Charts.simplified(s, sx, sy, Charts.TOLERANCE_PX);
        assertThat(simple.getItemCount()).isLessThan(s.getItemCount() / 10);
        for (int i = 0; i < s.getItemCount(); i++) {
            double d = distanceToLine(simple, s.getX(i).doubleValue(), s.getY(i).doubleValue(), sx, sy);
            assertThat(d).as("point %d", i).isLessThanOrEqualTo(Charts.TOLERANCE_PX + 1e-9);
        }
    }

    @Test
    void aStraightLineKeepsItsEndsAndBreaksStayBreaks() {
        XYSeries s = Charts.series("two pieces");
        for (int i = 0; i <= 100; i++) {
            s.add(i, 2.0 * i);
        }
        s.add(Double.NaN, Double.NaN);
        for (int i = 200; i <= 300; i++) {
            s.add(i, 5.0);
        }
        XYSeries simple = Charts.simplified(s, 1.0, 1.0, 0.4);
        assertThat(simple.getItemCount()).isEqualTo(5);
        assertThat(simple.getX(0).doubleValue()).isZero();
        assertThat(simple.getX(1).doubleValue()).isEqualTo(100.0);
        assertThat(simple.getX(2).doubleValue()).isNaN();
        assertThat(simple.getX(3).doubleValue()).isEqualTo(200.0);
        assertThat(simple.getX(4).doubleValue()).isEqualTo(300.0);
    }

    /** Point markers are drawn when asked: the chart then has a shape per point. */
    @Test
    void markersAreDrawnAtThePointsWhenAsked() {
        System.setProperty("java.awt.headless", "true");
        XYSeries s = Charts.series("median");
        s.add(10, 0.5);
        s.add(30, 1.2);
        s.add(60, 3.1);
        String plain = Charts.svg("t", "x", "y", List.of(new Charts.Line(s, Charts.configColor(0), Charts.solid(2f),
                false, false)), 400, 300, false, "a");
        String marked = Charts.svg("t", "x", "y", List.of(new Charts.Line(s, Charts.configColor(0), Charts.solid(2f),
                false, true)), 400, 300, false, "a");
        int shapesPlain = plain.split("<rect").length + plain.split("<path").length;
        int shapesMarked = marked.split("<rect").length + marked.split("<path").length;
        assertThat(shapesMarked - shapesPlain).isGreaterThanOrEqualTo(3);
    }
}
