package dev.lawful.bench;

import org.nd4j.linalg.api.buffer.DataType;
import org.nd4j.linalg.api.ndarray.INDArray;
import org.nd4j.linalg.api.ops.impl.transforms.custom.MatrixSetDiag;
import org.nd4j.linalg.factory.Nd4j;
import org.nd4j.linalg.indexing.NDArrayIndex;
import org.nd4j.linalg.inverse.InvertMatrix;
import org.nd4j.linalg.ops.transforms.Transforms;

/**
 * The second comparison of {@link KernelBench}: the same algebra as {@link HandKernels}, written the way a user
 * naturally writes it with ND4J array ops in double (new arrays per op, batched where ND4J has the op):
 * <ul>
 *   <li>constant-affine: {@code yc = z·Mᵀ + x·Nᵀ} (two gemms and an add), then {@code hstack(yc, z)}; backward
 *       {@code gz = gf + gc·M}, {@code gx = gc·N};</li>
 *   <li>affine: the batch of blocks K(x) as a [batch, n, n] tensor ({@code MatrixSetDiag} plus the constant
 *       coupling), one batched {@code Nd4j.linalg().solve}; backward the same solve with {@code adjoint};</li>
 *   <li>nonlinear: batched Newton, each step a residual from array ops, a batched Jacobian and a batched solve,
 *       until the largest step is below 1e-14 of the largest output; backward as affine;</li>
 *   <li>projection: {@code out = y − ((y·Aᵀ − x)·S⁻¹)·A} with S⁻¹ = (AAᵀ)⁻¹ from {@code InvertMatrix};
 *       backward {@code μ = (g·Aᵀ)·S⁻¹}, {@code gy = g − μ·A}, {@code gx = μ}.</li>
 * </ul>
 * Results are new arrays, returned to the caller (which sinks them).
 */
final class Nd4jKernels {
    private final String tier;
    private final int n;
    private final int f;
    private final int p;
    /** B (n×F) and Bᵀ. */
    private final INDArray b;
    private final INDArray bT;
    /** The constant coupling of the block (n×n) and its transpose. */
    private final INDArray coupling;
    private final INDArray couplingT;
    /** Constant-affine: M = K⁻¹B, N = K⁻¹, and transposes. */
    private final INDArray m;
    private final INDArray mT;
    private final INDArray nx;
    private final INDArray nxT;
    /** Projection: A (n×p), Aᵀ, S⁻¹. */
    private final INDArray a;
    private final INDArray aT;
    private final INDArray sInverse;

    Nd4jKernels(String tier, int free, int laws) {
        this.tier = tier;
        this.n = laws;
        this.f = free;
        this.p = laws + free;
        double[][] bRows = new double[n][f];
        double[][] k = new double[n][n];
        double c = GridLaws.coupling(tier);
        for (int r = 0; r < n; r++) {
            for (int j = 0; j < f; j++) {
                bRows[r][j] = GridLaws.coefficient(r, j);
            }
            k[r][GridLaws.next(r, n)] += c;
        }
        b = Nd4j.create(bRows);
        bT = b.transpose().dup();
        coupling = Nd4j.create(k);
        couplingT = coupling.transpose().dup();
        INDArray block = coupling.add(Nd4j.eye(n).castTo(DataType.DOUBLE));
        if (tier.equals("constant-affine")) {
            nx = InvertMatrix.invert(block, false);
            nxT = nx.transpose().dup();
            m = nx.mmul(b);
            mT = m.transpose().dup();
        } else {
            nx = null;
            nxT = null;
            m = null;
            mT = null;
        }
        if (tier.equals("projection")) {
            a = Nd4j.hstack(block, b.neg());
            aT = a.transpose().dup();
            sInverse = InvertMatrix.invert(a.mmul(aT), false);
        } else {
            a = null;
            aT = null;
            sInverse = null;
        }
    }

    /**
     * Forward: x [batch, nIn], z [batch, F] (projection: the incoming outputs [batch, p]).
     *
     * @return the outputs [batch, p]
     */
    INDArray forward(INDArray x, INDArray z) {
        switch (tier) {
            case "constant-affine":
                return Nd4j.hstack(z.mmul(mT).addi(x.mmul(nxT)), z);
            case "affine": {
                long batch = z.size(0);
                INDArray rhs = z.mmul(bT).addi(x.get(NDArrayIndex.all(), NDArrayIndex.interval(n, 2 * n)));
                INDArray yc = Nd4j.linalg().solve(affineBlocks(x), rhs.reshape(batch, n, 1))
                        .reshape(batch, n);
                return Nd4j.hstack(yc, z);
            }
            case "nonlinear":
                return Nd4j.hstack(newton(x, z), z);
            default: {
                INDArray lambda = z.mmul(aT).subi(x).mmul(sInverse);
                return z.sub(lambda.mmul(a));
            }
        }
    }

    /**
     * Backward: y the forward outputs [batch, p] (projection: the incoming outputs), g the upstream gradient
     * [batch, p].
     *
     * @return {gz, gx}: [batch, F] (projection: [batch, p]) and [batch, nIn]
     */
    INDArray[] backward(INDArray x, INDArray y, INDArray g) {
        if (tier.equals("projection")) {
            INDArray mu = g.mmul(aT).mmul(sInverse);
            return new INDArray[] {g.sub(mu.mmul(a)), mu};
        }
        INDArray gc = g.get(NDArrayIndex.all(), NDArrayIndex.interval(0, n));
        INDArray gf = g.get(NDArrayIndex.all(), NDArrayIndex.interval(n, p));
        if (tier.equals("constant-affine")) {
            return new INDArray[] {gf.add(gc.mmul(m)), gc.mmul(nx)};
        }
        long batch = g.size(0);
        INDArray yc = y.get(NDArrayIndex.all(), NDArrayIndex.interval(0, n));
        INDArray blocks = tier.equals("affine") ? affineBlocks(x) : newtonBlocks(yc);
        INDArray lambda = Nd4j.linalg().solve(blocks, gc.reshape(batch, n, 1), true).reshape(batch, n);
        INDArray gz = gf.add(lambda.mmul(b));
        INDArray gx = tier.equals("affine") ? Nd4j.hstack(lambda.mul(yc).negi(), lambda) : lambda;
        return new INDArray[] {gz, gx};
    }

    /** K(x) per sample: diagonal 1 + x_k, plus the constant coupling. */
    private INDArray affineBlocks(INDArray x) {
        long batch = x.size(0);
        INDArray diagonal = x.get(NDArrayIndex.all(), NDArrayIndex.interval(0, n)).add(1.0);
        return withCoupling(diagonal, batch);
    }

    /** The Newton Jacobian per sample: diagonal 3y_k² + 1, plus the constant coupling. */
    private INDArray newtonBlocks(INDArray yc) {
        INDArray diagonal = yc.mul(yc).muli(3).addi(1.0);
        return withCoupling(diagonal, yc.size(0));
    }

    private INDArray withCoupling(INDArray diagonal, long batch) {
        INDArray zeros = Nd4j.zeros(DataType.DOUBLE, batch, n, n);
        INDArray blocks = Nd4j.exec(new MatrixSetDiag(zeros, diagonal))[0];
        return blocks.addi(coupling.reshape(1, n, n).broadcast(batch, n, n));
    }

    private INDArray newton(INDArray x, INDArray z) {
        long batch = z.size(0);
        INDArray rhs = z.mmul(bT).addi(x);
        INDArray y = Nd4j.zeros(DataType.DOUBLE, batch, n);
        for (int iteration = 0; iteration < 60; iteration++) {
            INDArray residual = y.mul(y).muli(y).addi(y).addi(y.mmul(couplingT)).subi(rhs);
            INDArray step = Nd4j.linalg().solve(newtonBlocks(y), residual.reshape(batch, n, 1)).reshape(batch, n);
            y.subi(step);
            double largest = Transforms.abs(y).maxNumber().doubleValue();
            if (Transforms.abs(step).maxNumber().doubleValue() <= 1e-14 * Math.max(1, largest)) {
                break;
            }
        }
        return y;
    }
}
