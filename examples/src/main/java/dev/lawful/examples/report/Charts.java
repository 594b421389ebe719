package dev.lawful.examples.report;

import java.awt.BasicStroke;
import java.awt.Color;
import java.awt.Font;
import java.awt.Graphics2D;
import java.awt.RenderingHints;
import java.awt.geom.Rectangle2D;
import java.awt.image.BufferedImage;
import java.io.IOException;
import java.nio.file.Path;
import java.util.List;
import javax.imageio.ImageIO;
import org.jfree.chart.JFreeChart;
import org.jfree.chart.plot.XYPlot;
import org.jfree.chart.title.TextTitle;

/**
 * What the two figures share: their size, the colour of each network, the panel grid, and writing PNG files.
 *
 * <p>A figure is {@value #WIDTH} px wide: a title band of {@value #TITLE_HEIGHT} px, then panels of
 * {@value #PANEL_HEIGHT} px height in {@link #columns(int)} columns, so its height is
 * {@code TITLE_HEIGHT + ceil(panels / columns) * PANEL_HEIGHT} ({@link #height(int)}).
 *
 * <p>Drawing needs no display: {@link #ensureHeadless()} sets {@code java.awt.headless=true} unless the property
 * is already set.
 */
final class Charts {
    /** Figure width in pixels. */
    static final int WIDTH = 1200;
    /** Height of one panel in pixels. */
    static final int PANEL_HEIGHT = 440;
    /** Height of the figure's title band in pixels. */
    static final int TITLE_HEIGHT = 44;

    /**
     * Network colours in run order, from the Okabe-Ito palette, which stays distinct for the common colour-vision
     * deficiencies: vermillion, blue, bluish green, orange, reddish purple, sky blue, yellow; repeats after seven.
     */
    private static final Color[] PALETTE = {new Color(0xD55E00), new Color(0x0072B2), new Color(0x009E73),
        new Color(0xE69F00), new Color(0xCC79A7), new Color(0x56B4E9), new Color(0xF0E442)};

    /**
     * Sets {@code java.awt.headless=true} unless the property is set; call before the first chart is made, since
     * AWT reads the property once.
     */
    static void ensureHeadless() {
        if (System.getProperty("java.awt.headless") == null) {
            System.setProperty("java.awt.headless", "true");
        }
    }

    private Charts() {
    }

    /** @return the colour of the run at {@code index} */
    static Color colour(int index) {
        return PALETTE[index % PALETTE.length];
    }

    /** @return {@code c} with the given opacity, 0 .. 255 */
    static Color translucent(Color c, int alpha) {
        return new Color(c.getRed(), c.getGreen(), c.getBlue(), alpha);
    }

    /** @return the number of panel columns: 1 for a single panel, 2 otherwise */
    static int columns(int panels) {
        return panels == 1 ? 1 : 2;
    }

    /** @return the figure height in pixels for {@code panels} panels */
    static int height(int panels) {
        int c = columns(panels);
        return TITLE_HEIGHT + (panels + c - 1) / c * PANEL_HEIGHT;
    }

    /** Gives a panel the shared look: white background, light grid, readable fonts. */
    static void style(JFreeChart chart) {
        chart.setBackgroundPaint(Color.WHITE);
        chart.setAntiAlias(true);
        chart.setTextAntiAlias(true);
        TextTitle t = chart.getTitle();
        if (t != null) {
            t.setFont(new Font(Font.SANS_SERIF, Font.BOLD, 15));
        }
        XYPlot plot = chart.getXYPlot();
        plot.setBackgroundPaint(Color.WHITE);
        plot.setDomainGridlinePaint(new Color(0xDDDDDD));
        plot.setRangeGridlinePaint(new Color(0xDDDDDD));
        plot.setDomainGridlineStroke(new BasicStroke(1f));
        plot.setRangeGridlineStroke(new BasicStroke(1f));
        plot.setOutlinePaint(new Color(0x999999));
        Font label = new Font(Font.SANS_SERIF, Font.PLAIN, 13);
        Font tick = new Font(Font.SANS_SERIF, Font.PLAIN, 12);
        for (int i = 0; i < plot.getDomainAxisCount(); i++) {
            plot.getDomainAxis(i).setLabelFont(label);
            plot.getDomainAxis(i).setTickLabelFont(tick);
        }
        for (int i = 0; i < plot.getRangeAxisCount(); i++) {
            plot.getRangeAxis(i).setLabelFont(label);
            plot.getRangeAxis(i).setTickLabelFont(tick);
        }
        if (chart.getLegend() != null) {
            chart.getLegend().setItemFont(new Font(Font.SANS_SERIF, Font.PLAIN, 12));
        }
    }

    /**
     * Draws panels in a grid under a title.
     *
     * @param title  the figure title
     * @param panels the charts, drawn left to right, top to bottom
     * @return the image, {@value #WIDTH} px by {@link #height(int)}
     */
    static BufferedImage grid(String title, List<JFreeChart> panels) {
        int columns = columns(panels.size());
        int height = height(panels.size());
        BufferedImage image = new BufferedImage(WIDTH, height, BufferedImage.TYPE_INT_RGB);
        Graphics2D g = image.createGraphics();
        try {
            g.setRenderingHint(RenderingHints.KEY_ANTIALIASING, RenderingHints.VALUE_ANTIALIAS_ON);
            g.setRenderingHint(RenderingHints.KEY_TEXT_ANTIALIASING, RenderingHints.VALUE_TEXT_ANTIALIAS_ON);
            g.setColor(Color.WHITE);
            g.fillRect(0, 0, WIDTH, height);
            g.setColor(Color.BLACK);
            // the largest bold size up to 19 pt at which the title fits the width, so a long one is never cut
            int size = 19;
            g.setFont(new Font(Font.SANS_SERIF, Font.BOLD, size));
            while (size > 11 && g.getFontMetrics().stringWidth(title) > WIDTH - 16) {
                size--;
                g.setFont(new Font(Font.SANS_SERIF, Font.BOLD, size));
            }
            int w = g.getFontMetrics().stringWidth(title);
            g.drawString(title, Math.max(8, (WIDTH - w) / 2), TITLE_HEIGHT - 14);
            int panelWidth = WIDTH / columns;
            for (int i = 0; i < panels.size(); i++) {
                Rectangle2D area = new Rectangle2D.Double(i % columns * panelWidth, TITLE_HEIGHT
                        + (double) (i / columns) * PANEL_HEIGHT, panelWidth, PANEL_HEIGHT);
                panels.get(i).draw(g, area);
            }
        } finally {
            g.dispose();
        }
        return image;
    }

    /**
     * @param image the figure
     * @param file  the PNG file to write (replaced when it exists)
     * @throws IOException when the file cannot be written
     */
    static void writePng(BufferedImage image, Path file) throws IOException {
        if (!ImageIO.write(image, "png", file.toFile())) {
            throw new IOException("no PNG writer is available in this Java runtime, cannot write " + file);
        }
    }
}
