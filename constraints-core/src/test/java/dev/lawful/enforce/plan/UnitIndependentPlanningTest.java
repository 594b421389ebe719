package dev.lawful.enforce.plan;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.lawful.algebra.LawException;
import dev.lawful.algebra.LawSet;
import dev.lawful.enforce.Completion;
import java.util.List;
import org.apache.commons.math3.linear.Array2DRowRealMatrix;
import org.apache.commons.math3.linear.SingularValueDecomposition;
import org.junit.jupiter.api.Test;

/**
 * The planning decisions (accepted or refused, the automatic choice, the condition number) do not depend on the
 * units a user declares: the same physics in three consistent unit systems plans the same.
 */
class UnitIndependentPlanningTest {
    /** Units of areas, density, velocities and pressures; every system consistent with the SI one. */
    private static final List<String[]> SYSTEMS = List.of(
            new String[] {"m2", "kg/m3", "m/s", "Pa"},
            new String[] {"cm2", "kg/m3", "m/s", "kPa"},
            new String[] {"mm2", "g/cm3", "cm/s", "MPa"});

    /**
     * Continuity and Bernoulli's equation along a streamline between two sections of a pipe (common practice:
     * incompressible, inviscid, level flow).
     */
    private static LawSet pipe(String[] u, boolean completeStatement, String extraLaw) {
        return LawSet.parse("<pipe " + u[0] + ">", String.join("\n",
                "input  A1 " + u[0],
                "input  A2 " + u[0],
                "input  rho " + u[1],
                "output v1 " + u[2],
                "output v2 " + u[2],
                "output p1 " + u[3],
                "output p2 " + u[3],
                "law continuity: A1 * v1 = A2 * v2",
                "law bernoulli:  p1 + 0.5 * rho * v1^2 = p2 + 0.5 * rho * v2^2",
                extraLaw,
                completeStatement ? "complete v2, p2" : "",
                ""));
    }

    @Test
    void theSamePhysicsInThreeUnitSystemsPlansTheSame() {
        double reference = Double.NaN;
        List<String> automatic = null;
        double automaticCondition = Double.NaN;
        for (String[] u : SYSTEMS) {
            Completion chosen = Completion.of(pipe(u, true, ""));
            Completion auto = Completion.builder(pipe(u, false, "")).build();
            if (Double.isNaN(reference)) {
                reference = chosen.condition();
                automatic = auto.completedNames();
                automaticCondition = auto.condition();
            }
            String where = "declared in " + String.join(", ", u);
            assertEquals(reference, chosen.condition(), 1e-9 * reference, where);
            assertEquals(automatic, auto.completedNames(), where);
            assertEquals(automaticCondition, auto.condition(), 1e-9 * automaticCondition, where);
        }
        assertTrue(reference < 100, "a triangular block with a healthy diagonal is well conditioned, found "
                + reference);
    }

    @Test
    void theConditionNumberIsThatOfTheEquilibratedBlock() {
        for (String[] u : SYSTEMS) {
            LawSet laws = pipe(u, true, "");
            ReferencePoint point = ReferencePoint.generic(laws);
            // the point in SI units: declared value times the unit's SI factor
            double a1 = point.input(0) * laws.inputs().get(0).unit().factor();
            double a2 = point.input(1) * laws.inputs().get(1).unit().factor();
            double rho = point.input(2) * laws.inputs().get(2).unit().factor();
            double v1 = point.output(0) * laws.outputs().get(0).unit().factor();
            double v2 = point.output(1) * laws.outputs().get(1).unit().factor();
            double p1 = point.output(2) * laws.outputs().get(2).unit().factor();
            double p2 = point.output(3) * laws.outputs().get(3).unit().factor();
            // rows: each law's derivatives times the outputs' magnitudes, over the sum of the magnitudes of its
            // terms (the natural scale); columns v2, p2
            double s1 = Math.abs(a1 * v1) + Math.abs(a2 * v2);
            double s2 = Math.abs(p1) + 0.5 * rho * v1 * v1 + Math.abs(p2) + 0.5 * rho * v2 * v2;
            double[][] block = {
                {-a2 * v2 / s1, 0},
                {-rho * v2 * v2 / s2, -p2 / s2}};
            // Source: Apache Commons Math 3.6.1 SingularValueDecomposition (2-norm condition number)
            double expected = new SingularValueDecomposition(new Array2DRowRealMatrix(block)).getConditionNumber();
            double found = Completion.of(laws).condition();
            assertEquals(expected, found, 1e-9 * expected, "declared in " + String.join(", ", u));
        }
    }

    @Test
    void aDependentSetIsRefusedInEveryUnitSystem() {
        for (String[] u : SYSTEMS) {
            LawSet laws = pipe(u, false, "law twice: 2 * A1 * v1 = 2 * A2 * v2");
            LawException e = assertThrows(LawException.class, () -> Completion.builder(laws).automatic().build(),
                    "declared in " + String.join(", ", u));
            assertTrue(e.getMessage().contains("law 'twice' is redundant: it is 2*continuity"), e.getMessage());
        }
    }
}
