package aislecast.jobs.report;

import java.awt.BasicStroke;
import java.awt.Color;
import java.awt.Font;
import java.awt.Paint;
import java.io.ByteArrayOutputStream;
import java.io.IOException;
import java.io.UncheckedIOException;
import java.util.List;
import java.util.Locale;
import org.jfree.chart.ChartUtils;
import org.jfree.chart.JFreeChart;
import org.jfree.chart.LegendItem;
import org.jfree.chart.LegendItemCollection;
import org.jfree.chart.annotations.XYTextAnnotation;
import org.jfree.chart.axis.AxisLocation;
import org.jfree.chart.axis.NumberAxis;
import org.jfree.chart.axis.SymbolAxis;
import org.jfree.chart.plot.IntervalMarker;
import org.jfree.chart.plot.PlotOrientation;
import org.jfree.chart.plot.ValueMarker;
import org.jfree.chart.plot.XYPlot;
import org.jfree.chart.renderer.PaintScale;
import org.jfree.chart.renderer.xy.StandardXYBarPainter;
import org.jfree.chart.renderer.xy.XYBarRenderer;
import org.jfree.chart.renderer.xy.XYBlockRenderer;
import org.jfree.chart.renderer.xy.XYErrorRenderer;
import org.jfree.chart.renderer.xy.XYLineAndShapeRenderer;
import org.jfree.chart.title.PaintScaleLegend;
import org.jfree.chart.ui.Layer;
import org.jfree.chart.ui.RectangleAnchor;
import org.jfree.chart.ui.RectangleEdge;
import org.jfree.chart.ui.RectangleInsets;
import org.jfree.chart.ui.TextAnchor;
import org.jfree.data.statistics.HistogramDataset;
import org.jfree.data.statistics.HistogramType;
import org.jfree.data.xy.DefaultXYZDataset;
import org.jfree.data.xy.XYSeries;
import org.jfree.data.xy.XYSeriesCollection;
import org.jfree.data.xy.YIntervalSeries;
import org.jfree.data.xy.YIntervalSeriesCollection;

/**
 * The report's charts, drawn by JFreeChart off screen and returned as PNG bytes. Every chart
 * function is pure: data in, image out.
 */
final class Charts {
  /** One colour per chain (colour-blind-safe palette of Okabe and Ito, 2008). */
  private static final Color[] CHAIN_COLOURS = {
    new Color(0x0072B2), new Color(0xD55E00), new Color(0x009E73), new Color(0xCC79A7),
    new Color(0xE69F00), new Color(0x56B4E9), new Color(0xF0E442), new Color(0x000000)
  };
  private static final Font TITLE = new Font(Font.SANS_SERIF, Font.BOLD, 14);
  private static final Font SMALL = new Font(Font.SANS_SERIF, Font.PLAIN, 10);

  static {
    // charts are drawn off screen; a server without a display must not try to open one
    if (System.getProperty("java.awt.headless") == null) {
      System.setProperty("java.awt.headless", "true");
    }
  }

  private Charts() {}

  /** A chart rendered to PNG. */
  record Png(byte[] bytes, int width, int height) {}

  static Png png(JFreeChart chart, int width, int height) {
    ByteArrayOutputStream out = new ByteArrayOutputStream();
    try {
      ChartUtils.writeChartAsPNG(out, chart, width, height);
    } catch (IOException e) {
      throw new UncheckedIOException("cannot encode chart '" + chart.getTitle() + "'", e);
    }
    return new Png(out.toByteArray(), width, height);
  }

  private static JFreeChart chart(String title, XYPlot plot, boolean legend) {
    JFreeChart c = new JFreeChart(title, TITLE, plot, legend);
    c.setBackgroundPaint(Color.WHITE);
    plot.setBackgroundPaint(Color.WHITE);
    plot.setDomainGridlinePaint(new Color(0xDDDDDD));
    plot.setRangeGridlinePaint(new Color(0xDDDDDD));
    return c;
  }

  /**
   * Posterior density of one parameter: a histogram of all chains pooled (area 1), with each
   * chain's own histogram on the same bins drawn as a line, so chains that disagree show.
   *
   * @param draws [chain][draw], NaN for a missing draw (not modified)
   */
  static Png density(String title, String axisLabel, double[][] draws) {
    double[] pooled = finite(draws);
    if (pooled.length == 0) {
      throw new IllegalArgumentException(title + ": no finite draws");
    }
    double lo = min(pooled);
    double hi = max(pooled);
    if (!(hi > lo)) { // a constant parameter still gets a visible bar
      double pad = Math.max(1e-9, Math.abs(lo) * 1e-3);
      lo -= pad;
      hi += pad;
    }
    // Rice rule (2 n^(1/3) bins, common practice), kept within 10..50
    int bins = (int) Math.max(10, Math.min(50, Math.ceil(2 * Math.cbrt(pooled.length))));
    HistogramDataset all = new HistogramDataset();
    all.setType(HistogramType.SCALE_AREA_TO_1);
    all.addSeries("all chains", pooled, bins, lo, hi);
    XYBarRenderer bars = new XYBarRenderer(0.0);
    bars.setBarPainter(new StandardXYBarPainter());
    bars.setShadowVisible(false);
    bars.setSeriesPaint(0, new Color(0xBBBBBB));
    bars.setDrawBarOutline(false);

    XYSeriesCollection perChain = new XYSeriesCollection();
    double width = (hi - lo) / bins;
    for (int c = 0; c < draws.length; c++) {
      double[] counts = new double[bins];
      int n = 0;
      for (double v : draws[c]) {
        if (Double.isFinite(v)) {
          counts[Math.min(bins - 1, (int) ((v - lo) / width))]++;
          n++;
        }
      }
      XYSeries s = new XYSeries("chain " + c);
      for (int b = 0; b < bins && n > 0; b++) {
        s.add(lo + (b + 0.5) * width, counts[b] / (n * width));
      }
      perChain.addSeries(s);
    }
    XYLineAndShapeRenderer lines = new XYLineAndShapeRenderer(true, false);
    for (int c = 0; c < draws.length; c++) {
      lines.setSeriesPaint(c, CHAIN_COLOURS[c % CHAIN_COLOURS.length]);
      lines.setSeriesStroke(c, new BasicStroke(1.4f));
    }
    NumberAxis x = new NumberAxis(axisLabel);
    x.setAutoRangeIncludesZero(false);
    NumberAxis y = new NumberAxis("density");
    XYPlot plot = new XYPlot(perChain, x, y, lines);
    plot.setDataset(1, all);
    plot.setRenderer(1, bars);
    return png(chart(title, plot, true), 520, 300);
  }

  /**
   * Trace of one parameter: value against kept draw, one line per chain.
   *
   * @param draws [chain][draw] (not modified)
   */
  static Png trace(String title, String axisLabel, double[][] draws) {
    XYSeriesCollection ds = new XYSeriesCollection();
    XYLineAndShapeRenderer lines = new XYLineAndShapeRenderer(true, false);
    for (int c = 0; c < draws.length; c++) {
      XYSeries s = new XYSeries("chain " + c, false, true);
      for (int d = 0; d < draws[c].length; d++) {
        if (Double.isFinite(draws[c][d])) {
          s.add(d, draws[c][d]);
        }
      }
      ds.addSeries(s);
      lines.setSeriesPaint(c, CHAIN_COLOURS[c % CHAIN_COLOURS.length]);
      lines.setSeriesStroke(c, new BasicStroke(0.8f));
    }
    NumberAxis x = new NumberAxis("kept draw");
    x.setStandardTickUnits(NumberAxis.createIntegerTickUnits());
    NumberAxis y = new NumberAxis(axisLabel);
    y.setAutoRangeIncludesZero(false);
    return png(chart(title, new XYPlot(ds, x, y, lines), true), 520, 300);
  }

  /** One store's band of a change over posterior draws. */
  record Band(String label, String region, double q05, double q25, double q50, double q75,
      double q95) {}

  /**
   * Forest plot: one row per store (grouped by region, regions shaded alternately), a thin bar
   * from the 5% to the 95% quantile, a thick bar from 25% to 75%, a dot at the median, and a
   * line at zero change.
   *
   * @param bands rows in display order, top first, already grouped by region
   */
  static Png forest(String title, String axisLabel, List<Band> bands) {
    int n = bands.size();
    String[] labels = new String[n];
    YIntervalSeries outer = new YIntervalSeries("5% to 95%");
    YIntervalSeries inner = new YIntervalSeries("25% to 75%");
    XYSeries median = new XYSeries("median");
    for (int i = 0; i < n; i++) {
      Band b = bands.get(i);
      labels[i] = b.label();
      outer.add(i, b.q50(), b.q05(), b.q95());
      inner.add(i, b.q50(), b.q25(), b.q75());
      median.add(i, b.q50());
    }
    XYErrorRenderer thin = intervalRenderer(1.2f, new Color(0x4A6FA5));
    XYErrorRenderer thick = intervalRenderer(6f, new Color(0x1F3F73));
    XYLineAndShapeRenderer dots = new XYLineAndShapeRenderer(false, true);
    dots.setSeriesPaint(0, new Color(0xD55E00));
    dots.setSeriesShape(0, new java.awt.geom.Ellipse2D.Double(-4, -4, 8, 8));

    SymbolAxis stores = new SymbolAxis(null, labels);
    stores.setInverted(true); // first store at the top
    stores.setTickLabelFont(SMALL);
    stores.setGridBandsVisible(false);
    stores.setRange(-0.8, n - 0.2);
    NumberAxis change = new NumberAxis(axisLabel);
    change.setAutoRangeIncludesZero(true);
    change.setUpperMargin(0.18); // room for the region names at the right
    XYPlot plot = new XYPlot(new XYSeriesCollection(median), stores, change, dots);
    plot.setDataset(1, collection(inner));
    plot.setRenderer(1, thick);
    plot.setDataset(2, collection(outer));
    plot.setRenderer(2, thin);
    plot.setOrientation(PlotOrientation.HORIZONTAL);
    // interval series draw no lines between stores, so their legend needs drawn-in samples
    LegendItemCollection legend = new LegendItemCollection();
    legend.add(new LegendItem("5% to 95%", null, null, null,
        new java.awt.geom.Rectangle2D.Double(-9, -0.6, 18, 1.2), new Color(0x4A6FA5)));
    legend.add(new LegendItem("25% to 75%", null, null, null,
        new java.awt.geom.Rectangle2D.Double(-9, -3, 18, 6), new Color(0x1F3F73)));
    legend.add(new LegendItem("median", null, null, null,
        new java.awt.geom.Ellipse2D.Double(-4, -4, 8, 8), new Color(0xD55E00)));
    plot.setFixedLegendItems(legend);
    plot.setRangeAxisLocation(AxisLocation.BOTTOM_OR_LEFT);
    plot.addRangeMarker(new ValueMarker(0.0, Color.DARK_GRAY, new BasicStroke(1f)));
    int start = 0;
    int shade = 0;
    for (int i = 1; i <= n; i++) {
      if (i == n || !bands.get(i).region().equals(bands.get(start).region())) {
        IntervalMarker m = new IntervalMarker(start - 0.5, i - 0.5,
            shade++ % 2 == 0 ? new Color(0xF1F4F9) : new Color(0xFFFFFF));
        m.setLabel(bands.get(start).region());
        m.setLabelFont(new Font(Font.SANS_SERIF, Font.ITALIC, 11));
        m.setLabelPaint(new Color(0x555555));
        m.setLabelAnchor(RectangleAnchor.TOP_RIGHT);
        m.setLabelTextAnchor(TextAnchor.TOP_RIGHT);
        m.setLabelOffset(new RectangleInsets(2, 2, 2, 6));
        m.setLabelBackgroundColor(new Color(0, 0, 0, 0));
        plot.addDomainMarker(m, Layer.BACKGROUND);
        start = i;
      }
    }
    int height = 130 + 16 * n;
    return png(chart(title, plot, true), 900, height);
  }

  private static YIntervalSeriesCollection collection(YIntervalSeries s) {
    YIntervalSeriesCollection c = new YIntervalSeriesCollection();
    c.addSeries(s);
    return c;
  }

  private static XYErrorRenderer intervalRenderer(float stroke, Color colour) {
    XYErrorRenderer r = new XYErrorRenderer();
    r.setDrawXError(false);
    r.setDrawYError(true);
    r.setCapLength(0);
    r.setErrorStroke(new BasicStroke(stroke, BasicStroke.CAP_BUTT, BasicStroke.JOIN_MITER));
    r.setErrorPaint(colour);
    r.setSeriesPaint(0, colour);
    r.setDefaultShapesVisible(false);
    r.setDefaultLinesVisible(false);
    return r;
  }

  /**
   * Heat map of a square matrix with its values printed in the cells. The colour scale is
   * diverging around zero and spans the largest absolute off-diagonal value, so cross effects
   * stay visible; diagonal cells beyond that span take the end colour.
   *
   * @param values [row][column] (not modified)
   */
  static Png heatMap(String title, String rowLabel, String columnLabel, String[] names,
      double[][] values) {
    int k = names.length;
    double span = 0;
    for (int r = 0; r < k; r++) {
      for (int c = 0; c < k; c++) {
        if (r != c && Double.isFinite(values[r][c])) {
          span = Math.max(span, Math.abs(values[r][c]));
        }
      }
    }
    if (!(span > 0)) {
      span = 1;
    }
    double[][] xyz = new double[3][k * k];
    int i = 0;
    for (int r = 0; r < k; r++) {
      for (int c = 0; c < k; c++) {
        xyz[0][i] = c;
        xyz[1][i] = r;
        xyz[2][i] = values[r][c];
        i++;
      }
    }
    DefaultXYZDataset ds = new DefaultXYZDataset();
    ds.addSeries("elasticity", xyz);
    XYBlockRenderer blocks = new XYBlockRenderer();
    Diverging scale = new Diverging(-span, span);
    blocks.setPaintScale(scale);
    SymbolAxis x = new SymbolAxis(columnLabel, names);
    x.setVerticalTickLabels(true);
    x.setTickLabelFont(SMALL);
    x.setGridBandsVisible(false);
    x.setRange(-0.5, k - 0.5);
    SymbolAxis y = new SymbolAxis(rowLabel, names);
    y.setInverted(true);
    y.setTickLabelFont(SMALL);
    y.setGridBandsVisible(false);
    y.setRange(-0.5, k - 0.5);
    XYPlot plot = new XYPlot(ds, x, y, blocks);
    plot.setDomainGridlinesVisible(false);
    plot.setRangeGridlinesVisible(false);
    int font = k <= 12 ? 10 : k <= 20 ? 8 : 7;
    Font cellFont = new Font(Font.SANS_SERIF, Font.PLAIN, font);
    for (int r = 0; r < k; r++) {
      for (int c = 0; c < k; c++) {
        if (!Double.isFinite(values[r][c])) {
          continue;
        }
        XYTextAnnotation a = new XYTextAnnotation(
            String.format(Locale.ROOT, Math.abs(values[r][c]) >= 10 ? "%.1f" : "%.2f",
                values[r][c]), c, r);
        a.setFont(cellFont);
        a.setPaint(Math.abs(values[r][c]) > 0.6 * span ? Color.WHITE : Color.BLACK);
        plot.addAnnotation(a);
      }
    }
    JFreeChart chart = chart(title, plot, false);
    NumberAxis legendAxis = new NumberAxis("elasticity (colours stop at \u00b1"
        + String.format(Locale.ROOT, "%.3g", span) + ")");
    legendAxis.setRange(-span, span);
    legendAxis.setTickLabelFont(SMALL);
    PaintScaleLegend legend = new PaintScaleLegend(scale, legendAxis);
    legend.setPosition(RectangleEdge.BOTTOM);
    legend.setMargin(new RectangleInsets(6, 60, 6, 60));
    legend.setStripWidth(12);
    chart.addSubtitle(legend);
    int cell = Math.max(26, Math.min(40, 720 / Math.max(1, k)));
    int side = 140 + cell * k;
    return png(chart, side + 40, side + 90);
  }

  /** Blue for negative, white at zero, red for positive; values beyond the bounds are clipped. */
  static final class Diverging implements PaintScale, java.io.Serializable {
    private static final long serialVersionUID = 1L;
    private final double lo;
    private final double hi;

    Diverging(double lo, double hi) {
      this.lo = lo;
      this.hi = hi;
    }

    @Override
    public double getLowerBound() {
      return lo;
    }

    @Override
    public double getUpperBound() {
      return hi;
    }

    @Override
    public Paint getPaint(double v) {
      if (!Double.isFinite(v)) {
        return new Color(0xCCCCCC);
      }
      double t = v < 0 ? Math.min(1, v / lo) : Math.min(1, v / hi);
      Color end = v < 0 ? new Color(0x2166AC) : new Color(0xB2182B);
      return mix(Color.WHITE, end, t);
    }

    private static Color mix(Color a, Color b, double t) {
      return new Color((int) Math.round(a.getRed() + t * (b.getRed() - a.getRed())),
          (int) Math.round(a.getGreen() + t * (b.getGreen() - a.getGreen())),
          (int) Math.round(a.getBlue() + t * (b.getBlue() - a.getBlue())));
    }
  }

  private static double[] finite(double[][] draws) {
    int n = 0;
    for (double[] c : draws) {
      for (double v : c) {
        n += Double.isFinite(v) ? 1 : 0;
      }
    }
    double[] out = new double[n];
    int i = 0;
    for (double[] c : draws) {
      for (double v : c) {
        if (Double.isFinite(v)) {
          out[i++] = v;
        }
      }
    }
    return out;
  }

  private static double min(double[] v) {
    double m = Double.POSITIVE_INFINITY;
    for (double x : v) {
      m = Math.min(m, x);
    }
    return m;
  }

  private static double max(double[] v) {
    double m = Double.NEGATIVE_INFINITY;
    for (double x : v) {
      m = Math.max(m, x);
    }
    return m;
  }
}
