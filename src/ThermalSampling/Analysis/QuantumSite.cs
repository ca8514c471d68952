using System;
using System.Collections.Generic;
using System.Globalization;
using System.Linq;
using MathNet.Numerics.LinearAlgebra;
using MathNet.Numerics.LinearAlgebra.Factorization;
using ThermalSampling.Internal;
using ThermalSampling.Landscapes;
using ThermalSampling.Potentials;
using ThermalSampling.Units;

namespace ThermalSampling.Analysis;

/// <summary>
/// The exact quantum displacement tensor of a particle at a site at low temperature, by a variational calculation: a
/// basis of products of harmonic-oscillator functions along the site's three normal modes (total quanta up to a
/// maximum), the kinetic energy exact in that basis, the potential's matrix elements by Gauss–Hermite quadrature of the
/// landscape's own energy (so the anharmonic terms are all there), diagonalised with MathNet; then the thermal averages
/// of the position and its products over the levels. The basis is enlarged until the covariance no longer changes at the
/// requested precision. It is the reference where few levels are populated: the result is refused (null, with the
/// reason) when the levels the basis describes well do not reach e^(−ΔE/kT) ≤ 1e-10 of the ground state.
/// </summary>
public sealed class QuantumSite
{
    private QuantumSite(Position mean, SymmetricTensor covariance, double[] levels, int basisSize, int maxQuanta, double change, bool converged, double kelvin)
    {
        Mean = mean;
        Covariance = covariance;
        LevelsInElectronVolts = levels;
        BasisSize = basisSize;
        MaxQuanta = maxQuanta;
        BasisChange = change;
        Converged = converged;
        TemperatureInKelvin = kelvin;
    }

    /// <summary>⟨x⟩, Å.</summary>
    public Position Mean { get; }

    /// <summary>⟨(x − ⟨x⟩)(x − ⟨x⟩)ᵀ⟩, the quantum covariance tensor in the landscape's frame, Å².</summary>
    public SymmetricTensor Covariance { get; }

    /// <summary>tr Covariance, Å².</summary>
    public double MeanSquareDisplacementInAngstromsSquared => Covariance.Trace;

    /// <summary>The lowest levels, eV (at most 20).</summary>
    public IReadOnlyList<double> LevelsInElectronVolts { get; }

    /// <summary>Basis functions in the final basis.</summary>
    public int BasisSize { get; }

    /// <summary>The most quanta a basis function has, summed over the three modes.</summary>
    public int MaxQuanta { get; }

    /// <summary>The largest change of a covariance component (relative to the trace) between the last two bases.</summary>
    public double BasisChange { get; }

    /// <summary>Whether the basis converged to the requested precision.</summary>
    public bool Converged { get; }

    /// <summary>The temperature, K.</summary>
    public double TemperatureInKelvin { get; }

    /// <summary>
    /// The quantum displacement tensor of <paramref name="landscape"/>'s site, or null when the temperature is too high
    /// for the basis (<paramref name="reason"/> says why).
    /// </summary>
    /// <typeparam name="TPotential">The potential type.</typeparam>
    /// <param name="landscape">The site.</param>
    /// <param name="mass">The particle's mass.</param>
    /// <param name="temperature">The temperature.</param>
    /// <param name="reason">Why there is no answer, or null.</param>
    /// <param name="precision">Relative precision of the covariance, 1e-10 to 1e-2 (default 1e-5).</param>
    public static QuantumSite? Compute<TPotential>(SiteLandscape<TPotential> landscape, Mass mass, Temperature temperature, out string? reason,
        double precision = 1e-5)
        where TPotential : struct, IPairPotential
    {
        Preconditions.CheckNotNull(landscape, nameof(landscape));
        if (!(precision >= 1e-10 && precision <= 1e-2))
        {
            throw new ArgumentOutOfRangeException(nameof(precision), precision, "The precision must lie between 1e-10 and 1e-2.");
        }
        var harmonic = SiteAnalysis.Harmonic(landscape, mass, temperature);
        double kT = temperature.ThermalEnergyInElectronVolts;
        // Bases of 8, 10, … quanta until the covariance holds still or the largest basis is reached (then not converged,
        // BasisChange saying by how much it still moved).
        var previous = Solve(landscape, harmonic, mass, kT, 8, out reason, temperature.InKelvin);
        for (int quanta = 10; previous is not null; quanta += 2)
        {
            var current = Solve(landscape, harmonic, mass, kT, quanta, out reason, temperature.InKelvin);
            if (current is null)
            {
                return null;
            }
            double change = Change(current.Covariance, previous.Covariance);
            if (change <= precision || quanta + 2 > MaxQuantaLimit)
            {
                return new QuantumSite(current.Mean, current.Covariance, [.. current.LevelsInElectronVolts], current.BasisSize, quanta, change, change <= precision,
                    temperature.InKelvin);
            }
            previous = current;
        }
        return null;
    }

    private const int MaxQuantaLimit = 14; // 680 functions: a diagonalisation of about a second; beyond, the cost grows as K⁹

    private static double Change(SymmetricTensor a, SymmetricTensor b)
    {
        double scale = a.Trace;
        double[] d = [a.XX - b.XX, a.YY - b.YY, a.ZZ - b.ZZ, a.XY - b.XY, a.XZ - b.XZ, a.YZ - b.YZ];
        return d.Max(Math.Abs) / scale;
    }

    private static QuantumSite? Solve<TPotential>(SiteLandscape<TPotential> landscape, SiteHarmonicEstimate harmonic, Mass mass, double kT, int quanta,
        out string? reason, double kelvin)
        where TPotential : struct, IPairPotential
    {
        double hbar2OverM = PhysicalConstants.HbarSquaredOverAtomicMassElectronVoltAngstromSquared / mass.InAtomicMassUnits;
        var modes = harmonic.Modes;
        var hw = modes.Select(m => Math.Sqrt(hbar2OverM * m.StiffnessElectronVoltsPerAngstromSquared)).ToArray(); // ħω per mode, eV
        var length = hw.Select(quantum => Math.Sqrt(hbar2OverM / quantum)).ToArray();                              // √(ħ/mω), Å
        int n = quanta + 1;
        // Basis: (a, b, c) with a + b + c ≤ quanta.
        var basis = new List<(int A, int B, int C)>();
        for (int a = 0; a <= quanta; a++)
        {
            for (int b = 0; a + b <= quanta; b++)
            {
                for (int c = 0; a + b + c <= quanta; c++)
                {
                    basis.Add((a, b, c));
                }
            }
        }
        int size = basis.Count;
        // Gauss–Hermite quadrature (Golub–Welsch: the eigenvalues of the Jacobi matrix of the Hermite weight e^(−ξ²)).
        int points = quanta + 8;
        var (nodes, weights) = GaussHermite(points);
        // h_k(ξ) = φ_k(ξ) e^(ξ²/2), the normalised Hermite functions without their Gaussian, at the nodes.
        var h = new double[points, n];
        for (int i = 0; i < points; i++)
        {
            h[i, 0] = Math.Pow(Math.PI, -0.25);
            if (n > 1)
            {
                h[i, 1] = Math.Sqrt(2) * nodes[i] * h[i, 0];
            }
            for (int k = 1; k + 1 < n; k++)
            {
                h[i, k + 1] = Math.Sqrt(2.0 / (k + 1)) * nodes[i] * h[i, k] - Math.Sqrt((double)k / (k + 1)) * h[i, k - 1];
            }
        }
        // The energy on the product grid (relative to the minimum), +∞ (outside the confinement or a hard core) as a high wall.
        var v = new double[points, points, points];
        var min = harmonic.Minimum;
        double v0 = harmonic.MinimumEnergyInElectronVolts;
        for (int i = 0; i < points; i++)
        {
            for (int j = 0; j < points; j++)
            {
                for (int k = 0; k < points; k++)
                {
                    var p = min + (nodes[i] * length[0]) * modes[0].Direction + (nodes[j] * length[1]) * modes[1].Direction + (nodes[k] * length[2]) * modes[2].Direction;
                    double energy = landscape.Contains(p) ? landscape.Energy(p) - v0 : double.PositiveInfinity;
                    v[i, j, k] = double.IsFinite(energy) ? Math.Min(energy, 1e3) : 1e3;
                }
            }
        }
        // V_(abc),(a'b'c') = Σ_ijk w_i w_j w_k h_a h_a' (ξ_i) h_b h_b' (ξ_j) h_c h_c' (ξ_k) V_ijk, one axis at a time.
        var t1 = new double[n, n, points, points];
        for (int a = 0; a < n; a++)
        {
            for (int a2 = a; a2 < n; a2++)
            {
                for (int j = 0; j < points; j++)
                {
                    for (int k = 0; k < points; k++)
                    {
                        double s = 0;
                        for (int i = 0; i < points; i++)
                        {
                            s += weights[i] * h[i, a] * h[i, a2] * v[i, j, k];
                        }
                        t1[a, a2, j, k] = t1[a2, a, j, k] = s;
                    }
                }
            }
        }
        var t2 = new double[n, n, n, n, points];
        for (int a = 0; a < n; a++)
        {
            for (int a2 = 0; a2 < n; a2++)
            {
                for (int b = 0; b < n; b++)
                {
                    for (int b2 = b; b2 < n; b2++)
                    {
                        for (int k = 0; k < points; k++)
                        {
                            double s = 0;
                            for (int j = 0; j < points; j++)
                            {
                                s += weights[j] * h[j, b] * h[j, b2] * t1[a, a2, j, k];
                            }
                            t2[a, a2, b, b2, k] = t2[a, a2, b2, b, k] = s;
                        }
                    }
                }
            }
        }
        var hamiltonian = Matrix<double>.Build.Dense(size, size);
        for (int r = 0; r < size; r++)
        {
            var (a, b, c) = basis[r];
            for (int s = r; s < size; s++)
            {
                var (a2, b2, c2) = basis[s];
                double value = 0;
                for (int k = 0; k < points; k++)
                {
                    value += weights[k] * h[k, c] * h[k, c2] * t2[a, a2, b, b2, k];
                }
                // The kinetic energy along each mode, (ħω/2)p² in the oscillator's basis, where the others' quanta agree.
                value += Kinetic(a, a2, hw[0]) * (b == b2 && c == c2 ? 1 : 0) + Kinetic(b, b2, hw[1]) * (a == a2 && c == c2 ? 1 : 0)
                    + Kinetic(c, c2, hw[2]) * (a == a2 && b == b2 ? 1 : 0);
                hamiltonian[r, s] = hamiltonian[s, r] = value;
            }
        }
        var evd = hamiltonian.Evd(Symmetricity.Symmetric);
        var energies = evd.EigenValues.Select(e => e.Real).ToArray();
        var vectors = evd.EigenVectors;
        // Only the lower part of a truncated basis's spectrum is trustworthy: the levels it populates must lie there.
        int trusted = size / 4;
        if (Math.Exp(-(energies[trusted] - energies[0]) / kT) > 1e-10)
        {
            reason = string.Create(CultureInfo.InvariantCulture,
                $"at {kelvin:G4} K the thermal population reaches levels {(energies[trusted] - energies[0]) * 1e3:G3} meV above the ground state (e^(−ΔE/kT) = {Math.Exp(-(energies[trusted] - energies[0]) / kT):G2} > 1e-10), beyond what a basis of {quanta} quanta describes: the temperature is too high for this reference; use path-integral sampling");
            return null;
        }
        // Thermal averages of ξ_m and ξ_m ξ_m' in the basis: position operators move one quantum along their mode.
        var index = new Dictionary<(int, int, int), int>();
        for (int r = 0; r < size; r++)
        {
            index[basis[r]] = r;
        }
        double z = 0;
        var first = new double[3];
        var second = new double[3, 3];
        var column = new double[size];
        for (int s = 0; s < size; s++)
        {
            double w = Math.Exp(-(energies[s] - energies[0]) / kT);
            if (w < 1e-16)
            {
                break;
            }
            z += w;
            for (int r = 0; r < size; r++)
            {
                column[r] = vectors[r, s];
            }
            var moved = new double[3][];
            for (int m = 0; m < 3; m++)
            {
                moved[m] = Position(column, basis, index, m);
                double x = 0;
                for (int r = 0; r < size; r++)
                {
                    x += column[r] * moved[m][r];
                }
                first[m] += w * x;
            }
            for (int m = 0; m < 3; m++)
            {
                for (int m2 = m; m2 < 3; m2++)
                {
                    double xx = 0;
                    for (int r = 0; r < size; r++)
                    {
                        xx += moved[m][r] * moved[m2][r]; // ⟨ψ|ξ_m ξ_m'|ψ⟩ = (ξ_m ψ)·(ξ_m' ψ): the position operators are symmetric
                    }
                    second[m, m2] += w * xx;
                }
            }
        }
        var meanModes = first.Select(f => f / z).ToArray();
        var cov = new double[3, 3];
        for (int m = 0; m < 3; m++)
        {
            for (int m2 = m; m2 < 3; m2++)
            {
                cov[m, m2] = cov[m2, m] = (second[m, m2] / z - meanModes[m] * meanModes[m2]) * length[m] * length[m2];
            }
        }
        // Back to the landscape's frame: x = x_min + Σ_m q_m e_m.
        var e = modes.Select(md => md.Direction).ToArray();
        var mean = min;
        for (int m = 0; m < 3; m++)
        {
            mean += (meanModes[m] * length[m]) * e[m];
        }
        double C(Func<Position, double> i, Func<Position, double> j)
        {
            double s = 0;
            for (int m = 0; m < 3; m++)
            {
                for (int m2 = 0; m2 < 3; m2++)
                {
                    s += i(e[m]) * cov[m, m2] * j(e[m2]);
                }
            }
            return s;
        }
        var covariance = new SymmetricTensor(C(p => p.X, p => p.X), C(p => p.Y, p => p.Y), C(p => p.Z, p => p.Z), C(p => p.X, p => p.Y), C(p => p.X, p => p.Z),
            C(p => p.Y, p => p.Z));
        reason = null;
        return new QuantumSite(mean, covariance, [.. energies.Take(20).Select(x => x + harmonic.MinimumEnergyInElectronVolts)], size, quanta, double.NaN, false, kelvin);
    }

    /// <summary>(ħω/2)⟨k|p²|k'⟩ in the oscillator basis: (k + ½) on the diagonal, −½√((k + 1)(k + 2)) two quanta apart.</summary>
    private static double Kinetic(int k, int k2, double hw)
    {
        if (k == k2)
        {
            return 0.5 * hw * (k + 0.5);
        }
        int lo = Math.Min(k, k2);
        return Math.Abs(k - k2) == 2 ? -0.25 * hw * Math.Sqrt((lo + 1.0) * (lo + 2)) : 0;
    }

    /// <summary>ξ_m applied to a state: ξ|k⟩ = √(k/2)|k − 1⟩ + √((k + 1)/2)|k + 1⟩ along mode m (a component beyond the basis is dropped).</summary>
    private static double[] Position(double[] state, List<(int A, int B, int C)> basis, Dictionary<(int, int, int), int> index, int mode)
    {
        var result = new double[state.Length];
        for (int r = 0; r < state.Length; r++)
        {
            var q = basis[r];
            int k = mode == 0 ? q.A : mode == 1 ? q.B : q.C;
            foreach (var (step, factor) in new[] { (-1, Math.Sqrt(k / 2.0)), (1, Math.Sqrt((k + 1) / 2.0)) })
            {
                var target = mode == 0 ? (q.A + step, q.B, q.C) : mode == 1 ? (q.A, q.B + step, q.C) : (q.A, q.B, q.C + step);
                if (factor > 0 && index.TryGetValue(target, out int t))
                {
                    result[t] += factor * state[r];
                }
            }
        }
        return result;
    }

    /// <summary>Gauss–Hermite nodes and weights for ∫e^(−ξ²)f(ξ)dξ by the Golub–Welsch algorithm.</summary>
    private static (double[] Nodes, double[] Weights) GaussHermite(int points)
    {
        var jacobi = Matrix<double>.Build.Dense(points, points);
        for (int k = 1; k < points; k++)
        {
            jacobi[k, k - 1] = jacobi[k - 1, k] = Math.Sqrt(k / 2.0);
        }
        var evd = jacobi.Evd(Symmetricity.Symmetric);
        var nodes = evd.EigenValues.Select(c => c.Real).ToArray();
        var weights = Enumerable.Range(0, points).Select(i => Math.Sqrt(Math.PI) * evd.EigenVectors[0, i] * evd.EigenVectors[0, i]).ToArray();
        return (nodes, weights);
    }

    /// <summary>A one-line summary.</summary>
    public override string ToString() => string.Create(CultureInfo.InvariantCulture,
        $"quantum site: MSD {MeanSquareDisplacementInAngstromsSquared:G5} Å² at {TemperatureInKelvin:G4} K ({BasisSize} functions, {MaxQuanta} quanta, {(Converged ? "converged" : "not converged")})");
}
