package dev.lawful;

/** A law set several test classes share. */
public final class CollisionLaws {
    /**
     * A two-body elastic collision in a plane. Geometry: the line of centres at impact is the input unit vector n;
     * t = (−n[1], n[0]) is the tangent. The four post-collision velocity components are completed from four laws:
     * momentum in x and y (a vector law), kinetic energy, and the unchanged tangential component of body 1 (for
     * smooth spheres the impulse acts along n only; body 2's tangential component then follows from momentum).
     * Momentum, tangent and the energy's quadratic leave two roots: the trivial v = u (no collision) and the
     * post-collision one.
     */
    public static final String TEXT = String.join("\n",
            "input m1 kg",
            "input m2 kg",
            "input u1[2] m/s",
            "input u2[2] m/s",
            "input n[2]",
            "output v1[2] m/s",
            "output v2[2] m/s",
            "law momentum: m1*v1 + m2*v2 = m1*u1 + m2*u2",
            "law energy: 0.5*m1*dot(v1, v1) + 0.5*m2*dot(v2, v2) = 0.5*m1*dot(u1, u1) + 0.5*m2*dot(u2, u2)",
            "law tangent: n[0]*v1[1] - n[1]*v1[0] = n[0]*u1[1] - n[1]*u1[0]",
            "complete v1, v2",
            "");

    private CollisionLaws() {
    }
}
