using System;
using System.Collections.Generic;
using System.Collections.Immutable;
using System.Globalization;
using System.Linq;
using MathNet.Numerics.Integration;
using ThermalSampling.Internal;
using ThermalSampling.Landscapes;
using ThermalSampling.Potentials;
using ThermalSampling.Units;

namespace ThermalSampling.Analysis;

/// <summary>
/// The exact classical distribution of the separation in a line or radial landscape,
/// p(r) ∝ rⁿ e^(−V(r)/kT) on the window (n = 0 or 2), by adaptive Gauss–Kronrod quadrature
/// (MathNet.Numerics) on pieces split at the minimum and at multiples of the harmonic width.
/// </summary>
public sealed class ExactPairDistribution
{
    private const double TargetRelativeError = 1e-11;
    private const int MaximumDepth = 10;

    private readonly Func<double, double> _weight;
    private readonly ImmutableArray<double> _breaks;

    private ExactPairDistribution(Func<double, double> weight, ImmutableArray<double> breaks, double lower, double upper,
        double temperatureKelvin, double referenceEnergy, string description)
    {
        _weight = weight;
        _breaks = breaks;
        WindowLowerInAngstroms = lower;
        WindowUpperInAngstroms = upper;
        TemperatureInKelvin = temperatureKelvin;
        ReferenceEnergyInElectronVolts = referenceEnergy;
        LandscapeDescription = description;

        double z = Integrate(r => weight(r), lower, upper, out double zError);
        if (!(z > 0) || !double.IsFinite(z))
        {
            throw new LandscapeException(string.Create(CultureInfo.InvariantCulture,
                $"The Boltzmann weight integrates to {z:R} over the window at T = {temperatureKelvin:G6} K; the distribution cannot be normalised."));
        }
        NormalisationError = zError / z;
        _normalisation = z;
        double mean = Integrate(r => r * weight(r), lower, upper, out _) / z;
        double m2 = Integrate(r => Pow(r - mean, 2) * weight(r), lower, upper, out _) / z;
        double m3 = Integrate(r => Pow(r - mean, 3) * weight(r), lower, upper, out _) / z;
        double m4 = Integrate(r => Pow(r - mean, 4) * weight(r), lower, upper, out _) / z;
        MeanInAngstroms = mean;
        VarianceInAngstromsSquared = m2;
        ThirdCentralMomentInAngstromsCubed = m3;
        FourthCentralMomentInAngstromsToTheFourth = m4;
        // Within one RMS spread of each wall; when the two bands meet they cover the window and hold everything.
        double band = Math.Sqrt(m2);
        ProbabilityNearLowerWall = Math.Min(1, Integrate(r => weight(r), lower, Math.Min(upper, lower + band), out _) / z);
        ProbabilityNearUpperWall = Math.Min(1, Integrate(r => weight(r), Math.Max(lower, upper - band), upper, out _) / z);
        ProbabilityNearWalls = lower + band >= upper - band ? 1 : Math.Min(1, ProbabilityNearLowerWall + ProbabilityNearUpperWall);
    }

    private readonly double _normalisation;

    /// <summary>The lower wall, Å.</summary>
    public double WindowLowerInAngstroms { get; }

    /// <summary>The upper wall, Å.</summary>
    public double WindowUpperInAngstroms { get; }

    /// <summary>The temperature, K.</summary>
    public double TemperatureInKelvin { get; }

    /// <summary>The energy subtracted inside the exponent to keep it in range (the lowest energy found on the window), eV.</summary>
    public double ReferenceEnergyInElectronVolts { get; }

    /// <summary>What was integrated.</summary>
    public string LandscapeDescription { get; }

    /// <summary>The quadrature's estimate of the relative error of the normalisation.</summary>
    public double NormalisationError { get; }

    /// <summary>⟨r⟩, Å.</summary>
    public double MeanInAngstroms { get; }

    /// <summary>⟨(r − ⟨r⟩)²⟩, Å².</summary>
    public double VarianceInAngstromsSquared { get; }

    /// <summary>√variance, Å.</summary>
    public double RmsInAngstroms => Math.Sqrt(VarianceInAngstromsSquared);

    /// <summary>⟨(r − ⟨r⟩)³⟩ (equal to the third cumulant), Å³.</summary>
    public double ThirdCentralMomentInAngstromsCubed { get; }

    /// <summary>⟨(r − ⟨r⟩)⁴⟩, Å⁴.</summary>
    public double FourthCentralMomentInAngstromsToTheFourth { get; }

    /// <summary>The skewness μ3/μ2^(3/2).</summary>
    public double Skewness => ThirdCentralMomentInAngstromsCubed / Math.Pow(VarianceInAngstromsSquared, 1.5);

    /// <summary>The excess kurtosis μ4/μ2² − 3.</summary>
    public double ExcessKurtosis => FourthCentralMomentInAngstromsToTheFourth / (VarianceInAngstromsSquared * VarianceInAngstromsSquared) - 3;

    /// <summary>The probability within one RMS spread of the lower wall.</summary>
    public double ProbabilityNearLowerWall { get; }

    /// <summary>The probability within one RMS spread of the upper wall.</summary>
    public double ProbabilityNearUpperWall { get; }

    /// <summary>
    /// The probability within one RMS spread of either wall, in [0, 1]: the measure the <c>wall-mass</c> warning uses. Near 0
    /// when the potential alone confines the particle; when it is not small, the walls hold the particle and the answer
    /// depends on where they are.
    /// </summary>
    public double ProbabilityNearWalls { get; }

    /// <summary>The normalised density p(r), 1/Å (zero outside the window).</summary>
    /// <param name="r">The separation, Å.</param>
    public double Density(double r)
    {
        Preconditions.CheckFinite(r, nameof(r));
        return r < WindowLowerInAngstroms || r > WindowUpperInAngstroms ? 0 : _weight(r) / _normalisation;
    }

    /// <summary>The cumulative probability P(R ≤ r).</summary>
    /// <param name="r">The separation, Å.</param>
    public double CumulativeProbability(double r)
    {
        Preconditions.CheckFinite(r, nameof(r));
        if (r <= WindowLowerInAngstroms)
        {
            return 0;
        }
        if (r >= WindowUpperInAngstroms)
        {
            return 1;
        }
        return Math.Clamp(Integrate(_weight, WindowLowerInAngstroms, r, out _) / _normalisation, 0, 1);
    }

    /// <summary>
    /// The generalised temperature factor T(q) = ⟨exp(iq(r − ⟨r⟩))⟩ of the separation by quadrature: its real part
    /// ⟨cos q(r − ⟨r⟩)⟩ and imaginary part ⟨sin q(r − ⟨r⟩)⟩ (nonzero only for an asymmetric distribution: −κ3 q³/6 to
    /// leading order). Compare with the harmonic exp(−q²σ²/2) to see at which q the Gaussian model fails.
    /// </summary>
    /// <param name="qPerAngstrom">The scattering vector's length along the separation, 1/Å (|q| up to 1000).</param>
    public (double Real, double Imaginary) TemperatureFactor(double qPerAngstrom)
    {
        Preconditions.CheckFinite(qPerAngstrom, nameof(qPerAngstrom));
        if (Math.Abs(qPerAngstrom) > 1000)
        {
            throw new ArgumentOutOfRangeException(nameof(qPerAngstrom), qPerAngstrom, "q must lie between −1000 and 1000 1/Å.");
        }
        double mean = MeanInAngstroms;
        // Oscillatory integrands: besides the break points, panels of at most a tenth of a period.
        double span = WindowUpperInAngstroms - WindowLowerInAngstroms;
        int panels = Math.Max(1, (int)Math.Ceiling(Math.Abs(qPerAngstrom) * span / (2 * Math.PI) * 10));
        double re = 0, im = 0;
        for (int p = 0; p < panels; p++)
        {
            double a = WindowLowerInAngstroms + span * p / panels, b = WindowLowerInAngstroms + span * (p + 1) / panels;
            re += Integrate(r => Math.Cos(qPerAngstrom * (r - mean)) * _weight(r), a, b, out _);
            im += Integrate(r => Math.Sin(qPerAngstrom * (r - mean)) * _weight(r), a, b, out _);
        }
        return (re / _normalisation, im / _normalisation);
    }

    /// <summary>P(a ≤ R ≤ b) by quadrature over [a, b] alone (inside the window).</summary>
    internal double ProbabilityBetween(double a, double b)
        => Integrate(_weight, Math.Max(a, WindowLowerInAngstroms), Math.Min(b, WindowUpperInAngstroms), out _) / _normalisation;

    /// <summary>The unnormalised weight rⁿ e^(−(V − Vref)/kT).</summary>
    internal Func<double, double> Weight => _weight;

    /// <summary>The break points used for quadrature (window ends included), Å.</summary>
    internal ImmutableArray<double> BreakPoints => _breaks;

    private static double Pow(double x, int n) => n switch { 2 => x * x, 3 => x * x * x, _ => x * x * x * x };

    /// <summary>Integrates f over [a, b] piecewise on the break points inside it.</summary>
    internal double Integrate(Func<double, double> f, double a, double b, out double error)
    {
        error = 0;
        double sum = 0;
        double left = a;
        foreach (double p in _breaks)
        {
            if (p <= a)
            {
                continue;
            }
            double right = Math.Min(p, b);
            sum += GaussKronrodRule.Integrate(f, left, right, out double e, out _, TargetRelativeError, MaximumDepth, 15);
            error += e;
            left = right;
            if (right >= b)
            {
                break;
            }
        }
        return sum;
    }

    /// <summary>The exact classical distribution of a line or radial landscape at one temperature.</summary>
    /// <typeparam name="TPotential">The potential type.</typeparam>
    /// <param name="landscape">The landscape.</param>
    /// <param name="temperature">The temperature.</param>
    /// <exception cref="NonFiniteEnergyException">When the potential returns NaN or −∞ inside the window.</exception>
    /// <exception cref="LandscapeException">When the weight cannot be normalised.</exception>
    public static ExactPairDistribution Compute<TPotential>(PairLandscape<TPotential> landscape, Temperature temperature)
        where TPotential : struct, IPairPotential
    {
        Preconditions.CheckNotNull(landscape, nameof(landscape));
        PairAnalysis.CheckTemperature(temperature);
        double lo = landscape.WindowLowerInAngstroms, hi = landscape.WindowUpperInAngstroms;
        double kt = temperature.ThermalEnergyInElectronVolts;
        var breaks = new SortedSet<double> { hi };
        const int uniformPieces = 32;
        for (int i = 1; i < uniformPieces; i++)
        {
            breaks.Add(lo + (hi - lo) * i / uniformPieces);
        }

        // The lowest energy on the window: from a scan, refined by the potential's well when it is inside.
        double vRef = double.PositiveInfinity;
        double rRef = lo;
        const int scan = 4096;
        for (int i = 0; i <= scan; i++)
        {
            double r = lo + (hi - lo) * i / scan;
            double v = landscape.CheckedEnergy(r);
            if (v < vRef)
            {
                vRef = v;
                rRef = r;
            }
        }
        var well = landscape.Potential.Well;
        if (well is not null && landscape.Contains(well.EquilibriumDistanceInAngstroms))
        {
            double v = landscape.CheckedEnergy(well.EquilibriumDistanceInAngstroms);
            if (v <= vRef)
            {
                vRef = v;
                rRef = well.EquilibriumDistanceInAngstroms;
            }
        }
        if (!double.IsFinite(vRef))
        {
            throw new LandscapeException("The energy is +∞ everywhere on the window; nothing can be integrated.");
        }

        // Split around the lowest point at multiples of the local harmonic width, so narrow peaks are resolved.
        breaks.Add(rRef);
        double k = landscape.Potential.Derivatives(rRef).Second;
        double width = k > 0 && double.IsFinite(k) ? Math.Sqrt(kt / k) : (hi - lo) / uniformPieces;
        for (double m = 0.5; m <= 64; m *= 2)
        {
            breaks.Add(rRef - m * width);
            breaks.Add(rRef + m * width);
        }
        var inside = breaks.Where(b => b > lo && b <= hi).ToImmutableArray();

        var potential = landscape.Potential;
        int n = landscape.JacobianPower;
        string description = potential.Description;
        double beta = 1 / kt;
        double Weight(double r)
        {
            double v = potential.Energy(r);
            if (double.IsNaN(v) || double.IsNegativeInfinity(v))
            {
                throw new NonFiniteEnergyException(r, v, description);
            }
            double w = Math.Exp(-(v - vRef) * beta);
            return n == 0 ? w : r * r * w;
        }
        return new ExactPairDistribution(Weight, inside, lo, hi, temperature.InKelvin, vRef, landscape.Description);
    }
}
