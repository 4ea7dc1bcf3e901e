package org.wayhold.report;

import java.awt.BasicStroke;
import java.awt.Color;
import java.awt.Font;
import java.awt.Paint;
import java.awt.Stroke;
import java.awt.geom.Rectangle2D;
import java.util.List;
import org.jfree.chart.JFreeChart;
import org.jfree.chart.axis.NumberAxis;
import org.jfree.chart.title.LegendTitle;
import org.jfree.chart.plot.XYPlot;
import org.jfree.chart.renderer.xy.XYLineAndShapeRenderer;
import org.jfree.chart.title.TextTitle;
import org.jfree.chart.ui.RectangleEdge;
import org.jfree.data.xy.XYSeries;
import org.jfree.data.xy.XYSeriesCollection;
import org.jfree.svg.SVGGraphics2D;

/**
 * Line charts drawn by JFreeChart and turned into inline SVG by JFreeSVG, in the report's own plain
 * style: white ground, thin grey grid, one colour per configuration.
 *
 * <p>A report of hours of driving holds hundreds of thousands of evaluation points, far more than a
 * chart's pixels can show: each line is simplified to what the pixels can show before it is drawn (the
 * Ramer-Douglas-Peucker algorithm in pixel space, within {@link #TOLERANCE_PX}; Douglas and Peucker,
 * Canadian Cartographer 10(2), 1973), and the SVG's coordinates are written to a tenth of a pixel.
 */
final class Charts {

    /** One colour per configuration, in order; reused beyond four. */
    static final Color[] CONFIG_COLORS = {new Color(0x1B6F7A), new Color(0xC2571A), new Color(0x6A4C93),
        new Color(0x5C7A1B)};
    static final Color REFERENCE = new Color(0xA0A0A0);
    static final Color WINDOW = new Color(0x202020);
    private static final Font FONT = new Font(Font.SANS_SERIF, Font.PLAIN, 12);
    private static final Font TITLE_FONT = new Font(Font.SANS_SERIF, Font.BOLD, 13);

    private Charts() {
    }

    static Color configColor(int i) {
        return CONFIG_COLORS[i % CONFIG_COLORS.length];
    }

    static Stroke solid(float width) {
        return new BasicStroke(width, BasicStroke.CAP_ROUND, BasicStroke.JOIN_ROUND);
    }

    static Stroke dashed(float width) {
        return new BasicStroke(width, BasicStroke.CAP_BUTT, BasicStroke.JOIN_ROUND, 10f, new float[] {5f, 4f}, 0f);
    }

    /** A series whose points keep their order; a NaN point breaks the line. */
    static XYSeries series(String name) {
        return new XYSeries(name, false, true);
    }

    /**
     * Largest distance a simplified line may stray from the full one (px): under half a pixel, which no
     * one can see.
     */
    static final double TOLERANCE_PX = 0.4;

    /** One line of a chart; {@code markers} draws a point marker at each of its points. */
    record Line(XYSeries series, Paint paint, Stroke stroke, boolean inLegend, boolean markers) {

        Line(XYSeries series, Paint paint, Stroke stroke, boolean inLegend) {
            this(series, paint, stroke, inLegend, false);
        }
    }

    /**
     * Draws a line chart.
     *
     * @param equalAspect true to give both axes the same metres per pixel (track plots)
     */
    static String svg(String title, String xLabel, String yLabel, List<Line> lines, int width, int height,
                      boolean equalAspect, String idPrefix) {
        XYSeriesCollection data = new XYSeriesCollection();
        XYLineAndShapeRenderer r = new XYLineAndShapeRenderer(true, false);
        // One path per series: a NaN point starts a new piece, and the SVG stays small.
        r.setDrawSeriesLineAsPath(true);
        for (int i = 0; i < lines.size(); i++) {
            Line l = lines.get(i);
            data.addSeries(l.series());
            r.setSeriesPaint(i, l.paint());
            r.setSeriesStroke(i, l.stroke());
            r.setSeriesVisibleInLegend(i, l.inLegend());
            r.setSeriesShapesVisible(i, l.markers());
            r.setSeriesShapesFilled(i, true);
        }
        NumberAxis x = new NumberAxis(xLabel);
        NumberAxis y = new NumberAxis(yLabel);
        for (NumberAxis a : new NumberAxis[] {x, y}) {
            a.setLabelFont(FONT);
            a.setTickLabelFont(FONT);
            a.setAutoRangeIncludesZero(false);
        }
        XYPlot plot = new XYPlot(data, x, y, r);
        plot.setBackgroundPaint(Color.WHITE);
        plot.setDomainGridlinePaint(new Color(0xE2E2E2));
        plot.setRangeGridlinePaint(new Color(0xE2E2E2));
        plot.setOutlinePaint(new Color(0xB0B0B0));
        if (equalAspect) {
            equalAspect(plot, data, width, height);
        }
        simplify(plot, data, lines, width, height);
        JFreeChart chart = new JFreeChart(null, FONT, plot, true);
        chart.setTitle(new TextTitle(title, TITLE_FONT));
        chart.setBackgroundPaint(Color.WHITE);
        chart.setAntiAlias(true);
        LegendTitle legend = chart.getLegend();
        legend.setItemFont(FONT);
        legend.setPosition(RectangleEdge.BOTTOM);
        legend.setFrame(org.jfree.chart.block.BlockBorder.NONE);
        SVGGraphics2D g = new SVGGraphics2D(width, height);
        // Fixed ids, so the same report gives the same HTML.
        g.setDefsKeyPrefix(idPrefix);
        g.setGeomDoubleConverter(Charts::tenthOfPixel);
        chart.draw(g, new Rectangle2D.Double(0, 0, width, height));
        return g.getSVGElement();
    }

    /** A coordinate to a tenth of a pixel, without a needless ".0". */
    static String tenthOfPixel(double v) {
        long tenths = Math.round(v * 10.0);
        if (tenths % 10 == 0) {
            return Long.toString(tenths / 10);
        }
        return (tenths < 0 ? "-" : "") + Math.abs(tenths) / 10 + "." + Math.abs(tenths) % 10;
    }

    /**
     * Fixes the axes at the ranges the full data gives, then replaces each line without markers by its
     * simplification in pixel space (lines with markers keep their points: each is a result).
     */
    private static void simplify(XYPlot plot, XYSeriesCollection data, List<Line> lines, int width, int height) {
        org.jfree.data.Range xr = plot.getDomainAxis().getRange();
        org.jfree.data.Range yr = plot.getRangeAxis().getRange();
        plot.getDomainAxis().setRange(xr);
        plot.getRangeAxis().setRange(yr);
        // The plot area is the chart less its margins (axis labels, title, legend), as in equalAspect.
        double pxPerX = (width - 90.0) / Math.max(xr.getLength(), 1e-12);
        double pxPerY = (height - 110.0) / Math.max(yr.getLength(), 1e-12);
        XYSeriesCollection simplified = new XYSeriesCollection();
        for (int i = 0; i < data.getSeriesCount(); i++) {
            XYSeries s = data.getSeries(i);
            simplified.addSeries(lines.get(i).markers() ? s : simplified(s, pxPerX, pxPerY, TOLERANCE_PX));
        }
        plot.setDataset(simplified);
    }

    /**
     * The series with each NaN-separated piece simplified by Ramer-Douglas-Peucker: a point is kept
     * when it lies farther than {@code tolerancePx} from the chord between the points kept around it,
     * distances taken in pixels ({@code pxPerX}, {@code pxPerY} per data unit). Ends of pieces are kept.
     */
    static XYSeries simplified(XYSeries s, double pxPerX, double pxPerY, double tolerancePx) {
        int n = s.getItemCount();
        double[] x = new double[n];
        double[] y = new double[n];
        for (int i = 0; i < n; i++) {
            x[i] = s.getX(i).doubleValue();
            y[i] = s.getY(i).doubleValue();
        }
        XYSeries out = new XYSeries(s.getKey(), false, true);
        int i = 0;
        while (i < n) {
            if (Double.isNaN(x[i]) || Double.isNaN(y[i])) {
                out.add(Double.NaN, Double.NaN);
                i++;
                continue;
            }
            int j = i;
            while (j + 1 < n && !Double.isNaN(x[j + 1]) && !Double.isNaN(y[j + 1])) {
                j++;
            }
            boolean[] keep = rdp(x, y, i, j, pxPerX, pxPerY, tolerancePx);
            for (int k = i; k <= j; k++) {
                if (keep[k - i]) {
                    out.add(x[k], y[k]);
                }
            }
            i = j + 1;
        }
        return out;
    }

    /** Which points of {@code [from, to]} Ramer-Douglas-Peucker keeps (iterative, so long lines cannot overflow the stack). */
    private static boolean[] rdp(double[] x, double[] y, int from, int to, double sx, double sy, double tol) {
        boolean[] keep = new boolean[to - from + 1];
        keep[0] = true;
        keep[to - from] = true;
        java.util.ArrayDeque<int[]> stack = new java.util.ArrayDeque<>();
        stack.push(new int[] {from, to});
        while (!stack.isEmpty()) {
            int[] seg = stack.pop();
            int a = seg[0];
            int b = seg[1];
            if (b - a < 2) {
                continue;
            }
            double ax = x[a] * sx;
            double ay = y[a] * sy;
            double dx = x[b] * sx - ax;
            double dy = y[b] * sy - ay;
            double len2 = dx * dx + dy * dy;
            double worst = -1.0;
            int at = -1;
            for (int k = a + 1; k < b; k++) {
                double px = x[k] * sx - ax;
                double py = y[k] * sy - ay;
                // Distance to the chord as a segment (a track may double back beyond its ends).
                double u = len2 == 0.0 ? 0.0 : Math.max(0.0, Math.min(1.0, (px * dx + py * dy) / len2));
                double d = Math.hypot(px - u * dx, py - u * dy);
                if (d > worst) {
                    worst = d;
                    at = k;
                }
            }
            if (worst > tol) {
                keep[at - from] = true;
                stack.push(new int[] {a, at});
                stack.push(new int[] {at, b});
            }
        }
        return keep;
    }

    /** Widens one axis so a metre is as long on both (about: the plot area is the chart less margins). */
    private static void equalAspect(XYPlot plot, XYSeriesCollection data, int width, int height) {
        double minX = Double.POSITIVE_INFINITY;
        double maxX = Double.NEGATIVE_INFINITY;
        double minY = Double.POSITIVE_INFINITY;
        double maxY = Double.NEGATIVE_INFINITY;
        for (int s = 0; s < data.getSeriesCount(); s++) {
            XYSeries ser = data.getSeries(s);
            for (int i = 0; i < ser.getItemCount(); i++) {
                double xv = ser.getX(i).doubleValue();
                double yv = ser.getY(i).doubleValue();
                if (Double.isFinite(xv) && Double.isFinite(yv)) {
                    minX = Math.min(minX, xv);
                    maxX = Math.max(maxX, xv);
                    minY = Math.min(minY, yv);
                    maxY = Math.max(maxY, yv);
                }
            }
        }
        if (!Double.isFinite(minX)) {
            return;
        }
        // Margins of the chart around its plot area (px): axis labels left and below, title and legend.
        double plotW = width - 90.0;
        double plotH = height - 110.0;
        double spanX = Math.max(maxX - minX, 1.0) * 1.04;
        double spanY = Math.max(maxY - minY, 1.0) * 1.04;
        double perPx = Math.max(spanX / plotW, spanY / plotH);
        double cx = (minX + maxX) / 2;
        double cy = (minY + maxY) / 2;
        plot.getDomainAxis().setRange(cx - perPx * plotW / 2, cx + perPx * plotW / 2);
        plot.getRangeAxis().setRange(cy - perPx * plotH / 2, cy + perPx * plotH / 2);
    }
}
