namespace TaskPhrase.Resolution.Scoring;

/// <summary>
/// Limited-memory BFGS (Nocedal &amp; Wright, "Numerical Optimization", 2nd ed., algorithms 7.4 and 7.5) with a
/// backtracking Armijo line search. Deterministic: plain double arithmetic in a fixed order.
/// </summary>
internal static class Lbfgs
{
    /// <summary>Returns f(x) and writes ∇f(x) into the gradient.</summary>
    public delegate double Objective(ReadOnlySpan<double> x, Span<double> gradient);

    /// <summary>The outcome of a minimisation.</summary>
    public readonly record struct Result(int Iterations, double Value, double GradientNorm, bool Converged);

    /// <summary>Minimises <paramref name="f"/> starting from (and overwriting) <paramref name="x"/>.</summary>
    /// <param name="f">The objective, assumed smooth.</param>
    /// <param name="x">The start point; receives the minimiser.</param>
    /// <param name="maxIterations">Most iterations.</param>
    /// <param name="gradientTolerance">Stop when the largest gradient component is at most this.</param>
    /// <param name="relativeTolerance">Stop when an iteration lowers f by at most this times max(1, |f|).</param>
    /// <param name="memory">Number of correction pairs kept.</param>
    public static Result Minimize(Objective f, Span<double> x, int maxIterations, double gradientTolerance = 1e-5,
        double relativeTolerance = 1e-10, int memory = 10)
    {
        int n = x.Length;
        var g = new double[n];
        var xNew = new double[n];
        var gNew = new double[n];
        var d = new double[n];
        var s = new double[memory][];
        var y = new double[memory][];
        for (int j = 0; j < memory; j++) { s[j] = new double[n]; y[j] = new double[n]; }
        var rho = new double[memory];
        var alpha = new double[memory];
        int stored = 0, newest = -1;

        double fx = f(x, g);
        int iter = 0;
        bool converged = false;
        while (true)
        {
            double gmax = MaxAbs(g);
            if (gmax <= gradientTolerance) { converged = true; break; }
            if (iter >= maxIterations) break;
            iter++;

            // Two-loop recursion: d = −H g.
            g.CopyTo(d, 0);
            for (int k = 0; k < stored; k++)
            {
                int j = (newest - k + memory) % memory;
                alpha[j] = rho[j] * Kernels.Dot(s[j], d);
                Kernels.AddScaled(y[j], -alpha[j], d);
            }
            double gamma = stored > 0 ? 1.0 / (rho[newest] * Kernels.Dot(y[newest], y[newest])) : 1.0 / Math.Max(1.0, Math.Sqrt(Kernels.Dot(g, g)));
            for (int i = 0; i < n; i++) d[i] *= gamma;
            for (int k = stored - 1; k >= 0; k--)
            {
                int j = (newest - k + memory) % memory;
                double beta = rho[j] * Kernels.Dot(y[j], d);
                Kernels.AddScaled(s[j], alpha[j] - beta, d);
            }
            for (int i = 0; i < n; i++) d[i] = -d[i];
            double gd = Kernels.Dot(g, d);
            if (!(gd < 0))
            {
                // Not a descent direction (numerical trouble): restart from steepest descent.
                stored = 0;
                double scale = 1.0 / Math.Max(1.0, Math.Sqrt(Kernels.Dot(g, g)));
                for (int i = 0; i < n; i++) d[i] = -scale * g[i];
                gd = Kernels.Dot(g, d);
            }

            double step = 1, fNew = double.NaN;
            bool armijo = false;
            for (int tries = 0; tries < 40; tries++)
            {
                for (int i = 0; i < n; i++) xNew[i] = x[i] + step * d[i];
                fNew = f(xNew, gNew);
                if (fNew <= fx + 1e-4 * step * gd) { armijo = true; break; }
                step *= 0.5;
            }
            if (!armijo) break; // No decrease representable: as good as it gets.

            int slot = (newest + 1) % memory;
            double sy = 0, yy = 0;
            for (int i = 0; i < n; i++)
            {
                s[slot][i] = xNew[i] - x[i];
                y[slot][i] = gNew[i] - g[i];
            }
            sy = Kernels.Dot(s[slot], y[slot]);
            yy = Kernels.Dot(y[slot], y[slot]);
            if (sy > 1e-12 * yy && sy > 0)
            {
                rho[slot] = 1.0 / sy;
                newest = slot;
                stored = Math.Min(stored + 1, memory);
            }
            double decrease = fx - fNew;
            xNew.CopyTo(x);
            (g, gNew) = (gNew, g);
            fx = fNew;
            if (decrease <= relativeTolerance * Math.Max(1.0, Math.Abs(fx))) { converged = true; break; }
        }
        return new Result(iter, fx, MaxAbs(g), converged);
    }

    private static double MaxAbs(ReadOnlySpan<double> v)
    {
        double m = 0;
        foreach (double e in v) m = Math.Max(m, Math.Abs(e));
        return m;
    }
}
