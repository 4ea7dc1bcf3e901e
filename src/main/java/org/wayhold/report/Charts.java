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

    /** One line of a chart. */
    record Line(XYSeries series, Paint paint, Stroke stroke, boolean inLegend) {
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
        chart.draw(g, new Rectangle2D.Double(0, 0, width, height));
        return g.getSVGElement();
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
