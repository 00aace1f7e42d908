package dev.onefold.benchmarks.report;

import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.TreeMap;

/**
 * A small line chart written as SVG text: a logarithmic x axis (batch or archive size), a linear y axis from
 * zero, one polyline with point markers per series, and a legend. Deterministic: the same data gives the same
 * bytes. Not thread-safe; building costs O(points).
 */
final class SvgChart {
    private static final String[] COLORS = {"#1f77b4", "#d62728", "#2ca02c", "#9467bd", "#ff7f0e"};
    private static final int WIDTH = 640;
    private static final int HEIGHT = 400;
    private static final int LEFT = 70;
    private static final int RIGHT = 170;
    private static final int TOP = 40;
    private static final int BOTTOM = 60;

    private final String title;
    private final String xLabel;
    private final String yLabel;
    private final Map<String, TreeMap<Double, Double>> series = new LinkedHashMap<>();

    SvgChart(String title, String xLabel, String yLabel) {
        this.title = title;
        this.xLabel = xLabel;
        this.yLabel = yLabel;
    }

    /** Adds one point; x must be positive (log scale). */
    SvgChart point(String seriesName, double x, double y) {
        if (!(x > 0) || !Double.isFinite(y)) {
            throw new IllegalArgumentException("point (" + x + ", " + y + ") of " + seriesName + " cannot be drawn");
        }
        series.computeIfAbsent(seriesName, k -> new TreeMap<>()).put(x, y);
        return this;
    }

    boolean isEmpty() {
        return series.isEmpty();
    }

    String render() {
        double minX = Double.MAX_VALUE;
        double maxX = -Double.MAX_VALUE;
        double maxY = 0;
        for (TreeMap<Double, Double> s : series.values()) {
            minX = Math.min(minX, s.firstKey());
            maxX = Math.max(maxX, s.lastKey());
            for (double y : s.values()) {
                maxY = Math.max(maxY, y);
            }
        }
        double lo = Math.floor(Math.log10(minX));
        double hi = Math.max(lo + 1, Math.ceil(Math.log10(maxX)));
        double top = niceCeiling(maxY);
        int plotW = WIDTH - LEFT - RIGHT;
        int plotH = HEIGHT - TOP - BOTTOM;
        StringBuilder sb = new StringBuilder();
        sb.append("<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"").append(WIDTH).append("\" height=\"").append(HEIGHT)
                .append("\" font-family=\"sans-serif\" font-size=\"12\">\n");
        sb.append("<rect width=\"100%\" height=\"100%\" fill=\"white\"/>\n");
        text(sb, WIDTH / 2.0, 22, "middle", 15, title);
        // axes, grid and ticks
        for (int i = 0; i <= 4; i++) {
            double y = TOP + plotH - plotH * i / 4.0;
            line(sb, LEFT, y, LEFT + plotW, y, "#dddddd");
            text(sb, LEFT - 6, y + 4, "end", 12, format(top * i / 4));
        }
        for (double e = lo; e <= hi; e++) {
            double x = LEFT + plotW * (e - lo) / (hi - lo);
            line(sb, x, TOP, x, TOP + plotH, "#dddddd");
            text(sb, x, TOP + plotH + 18, "middle", 12, sizeLabel(Math.pow(10, e)));
        }
        line(sb, LEFT, TOP + plotH, LEFT + plotW, TOP + plotH, "black");
        line(sb, LEFT, TOP, LEFT, TOP + plotH, "black");
        text(sb, LEFT + plotW / 2.0, HEIGHT - 15, "middle", 13, xLabel);
        sb.append(String.format(Locale.ROOT, "<text x=\"18\" y=\"%.1f\" text-anchor=\"middle\" font-size=\"13\" "
                + "transform=\"rotate(-90 18 %.1f)\">%s</text>%n", TOP + plotH / 2.0, TOP + plotH / 2.0, escape(yLabel)));
        int index = 0;
        for (Map.Entry<String, TreeMap<Double, Double>> s : series.entrySet()) {
            String color = COLORS[index % COLORS.length];
            List<String> points = new ArrayList<>();
            for (Map.Entry<Double, Double> p : s.getValue().entrySet()) {
                double x = LEFT + plotW * (Math.log10(p.getKey()) - lo) / (hi - lo);
                double y = TOP + plotH - plotH * p.getValue() / top;
                points.add(String.format(Locale.ROOT, "%.1f,%.1f", x, y));
                sb.append(String.format(Locale.ROOT, "<circle cx=\"%.1f\" cy=\"%.1f\" r=\"4\" fill=\"%s\"/>%n", x, y, color));
            }
            sb.append("<polyline fill=\"none\" stroke-width=\"2\" stroke=\"").append(color).append("\" points=\"")
                    .append(String.join(" ", points)).append("\"/>\n");
            double ly = TOP + 10 + 20 * index;
            line(sb, LEFT + plotW + 15, ly, LEFT + plotW + 35, ly, color);
            text(sb, LEFT + plotW + 40, ly + 4, "start", 12, s.getKey());
            index++;
        }
        return sb.append("</svg>\n").toString();
    }

    /** The smallest of 1, 2 or 5 times a power of ten at or above v (or 1 when v is 0). */
    static double niceCeiling(double v) {
        if (v <= 0) {
            return 1;
        }
        double p = Math.pow(10, Math.floor(Math.log10(v)));
        for (double m : new double[] {1, 2, 5, 10}) {
            if (m * p >= v) {
                return m * p;
            }
        }
        return 10 * p;
    }

    static String sizeLabel(double v) {
        if (v >= 1e6) {
            return format(v / 1e6) + "M";
        }
        if (v >= 1e3) {
            return format(v / 1e3) + "k";
        }
        return format(v);
    }

    private static String format(double v) {
        return v == Math.rint(v) ? Long.toString((long) v) : String.format(Locale.ROOT, "%.2f", v);
    }

    private static void line(StringBuilder sb, double x1, double y1, double x2, double y2, String color) {
        sb.append(String.format(Locale.ROOT, "<line x1=\"%.1f\" y1=\"%.1f\" x2=\"%.1f\" y2=\"%.1f\" stroke=\"%s\"/>%n",
                x1, y1, x2, y2, color));
    }

    private static void text(StringBuilder sb, double x, double y, String anchor, int size, String s) {
        sb.append(String.format(Locale.ROOT, "<text x=\"%.1f\" y=\"%.1f\" text-anchor=\"%s\" font-size=\"%d\">%s</text>%n",
                x, y, anchor, size, escape(s)));
    }

    private static String escape(String s) {
        return s.replace("&", "&amp;").replace("<", "&lt;").replace(">", "&gt;");
    }
}
