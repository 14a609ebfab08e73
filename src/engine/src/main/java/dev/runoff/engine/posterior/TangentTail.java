package dev.runoff.engine.posterior;

/**
 * The exponential envelope of a log-concave density beyond {@code edge}, up to the end of the support:
 * {@code exp(h(edge) + slack + slope (x - edge))} with {@code slope = h'(edge)}, the tangent of the concave
 * {@code h} at the edge (which lies above {@code h} everywhere), raised by {@code slack} against rounding.
 * {@code reach = 1 - exp(slope (end - edge))} is the share of the untruncated exponential's mass that lies
 * before the end, {@code area} the envelope's area.
 */
record TangentTail(double edge, double logHeight, double slope, double reach, double area) {
    /** No tail: the body reaches the end of the support. */
    static final TangentTail NONE = new TangentTail(0, 0, 1, 0, 0);

    static TangentTail of(RelativeLogDensity h, double edge, double end, double slack) {
        double logHeight = h.at(edge) + slack;
        double slope = h.slope(edge);
        double reach = -StrictMath.expm1(slope * (end - edge));
        double area = StrictMath.exp(logHeight) * reach / Math.abs(slope);
        return new TangentTail(edge, logHeight, slope, reach, area);
    }

    /** The envelope's point at fraction {@code u} in [0, 1) of its area, counted from the edge (inversion). */
    double point(double u) {
        return edge + StrictMath.log1p(-u * reach) / slope;
    }

    /** The log of the envelope at {@code x}. */
    double logEnvelope(double x) {
        return logHeight + slope * (x - edge);
    }
}
