using System;
using System.Collections.Immutable;
using System.Reflection;
using ThermalSampling.Analysis;
using ThermalSampling.Landscapes;
using ThermalSampling.Sampling;
using ThermalSampling.Units;

namespace ThermalSampling.Reports;

/// <summary>A sampled value and its standard error (one standard deviation of the estimate).</summary>
/// <param name="Value">The estimate.</param>
/// <param name="StandardError">Its standard error, from the effective sample size.</param>
public sealed record Estimate(double Value, double StandardError)
{
    /// <summary>(Value − reference)/StandardError; 0 when the standard error is 0 and the values agree.</summary>
    /// <param name="reference">The reference value.</param>
    public double ZScore(double reference)
        => StandardError > 0 ? (Value - reference) / StandardError : Value == reference ? 0 : double.PositiveInfinity;

    /// <summary>"value ± error" with the error rounded to two significant digits and the value to the same decimal place
    /// (invariant culture); the value alone, to five significant digits, when there is no finite positive error.</summary>
    public string ToRoundedString()
    {
        if (!double.IsFinite(Value))
        {
            return "–";
        }
        if (!double.IsFinite(StandardError) || StandardError <= 0)
        {
            return Value.ToString("G5", System.Globalization.CultureInfo.InvariantCulture);
        }
        int decimals = Math.Clamp(1 - (int)Math.Floor(Math.Log10(StandardError)), 0, 15);
        string f = "F" + decimals.ToString(System.Globalization.CultureInfo.InvariantCulture);
        return Value.ToString(f, System.Globalization.CultureInfo.InvariantCulture) + " ± " + StandardError.ToString(f, System.Globalization.CultureInfo.InvariantCulture);
    }
}

/// <summary>Fixed-bin histogram normalised to a probability density, with per-bin standard errors.</summary>
/// <param name="Lower">Lower edge of the first bin, Å.</param>
/// <param name="Upper">Upper edge of the last bin, Å.</param>
/// <param name="Density">Density per bin, 1/Å.</param>
/// <param name="DensityStandardError">√(p(1 − p)/ESS)/width per bin: the binomial error inflated by the autocorrelation time, with p
/// at least 1/(2 ESS) so that an empty bin's error is that of half an effective draw, not zero.</param>
/// <param name="Count">The draws counted.</param>
public sealed record Histogram(double Lower, double Upper, ImmutableArray<double> Density, ImmutableArray<double> DensityStandardError, long Count)
{
    /// <summary>The bin width, Å.</summary>
    public double BinWidth => (Upper - Lower) / Density.Length;

    /// <summary>The centre of bin <paramref name="index"/>, Å.</summary>
    /// <param name="index">0-based bin index.</param>
    public double BinCentre(int index) => Lower + (index + 0.5) * BinWidth;
}

/// <summary>
/// The generalised temperature factor T(q) = ⟨exp(iq·(x − ⟨x⟩))⟩ at one scattering vector, sampled with standard errors,
/// beside the Gaussian models: the harmonic one, exp(−½ qᵀU_h q), and the one with the sampled covariance, exp(−½ qᵀUq),
/// whose departure from T (with its own standard error) shows where a Gaussian displacement model fails.
/// </summary>
/// <param name="ScatteringVector">q, Å⁻¹: one value (a pair's separation) or three (a site's q_x, q_y, q_z).</param>
/// <param name="Real">Re T, sampled.</param>
/// <param name="Imaginary">Im T, sampled (zero for a distribution symmetric about its mean; −κ3 q³/6 to leading order in 1D).</param>
/// <param name="Harmonic">exp(−½ qᵀU_h q) with the harmonic covariance; absent where there is no harmonic estimate.</param>
/// <param name="Gaussian">exp(−½ qᵀUq) with the sampled covariance U.</param>
/// <param name="DepartureFromGaussian">Re T − <paramref name="Gaussian"/>, with the jackknife standard error of the difference.</param>
/// <param name="ExactReal">Re T by quadrature (pairs only).</param>
/// <param name="ExactImaginary">Im T by quadrature (pairs only).</param>
public sealed record TemperatureFactorPoint(ImmutableArray<double> ScatteringVector, Estimate Real, Estimate Imaginary, double? Harmonic, double Gaussian,
    Estimate DepartureFromGaussian, double? ExactReal, double? ExactImaginary)
{
    /// <summary>Re T over the harmonic factor (1 where the harmonic model holds), with its standard error; absent without a harmonic estimate.</summary>
    public Estimate? RatioToHarmonic => Harmonic is double h && h > 0 ? new Estimate(Real.Value / h, Real.StandardError / h) : null;

    /// <summary>Whether Re T departs from the Gaussian with the sampled covariance by more than three standard errors.</summary>
    public bool GaussianFails => Math.Abs(DepartureFromGaussian.Value) > 3 * DepartureFromGaussian.StandardError;
}

/// <summary>
/// A density over a square grid of cells on a plane (the site's projection on its two largest principal axes), with
/// per-cell standard errors as for <see cref="Histogram"/>.
/// </summary>
/// <param name="FirstLower">Lower edge along the first axis, Å (from the distribution's centre).</param>
/// <param name="FirstUpper">Upper edge along the first axis, Å.</param>
/// <param name="SecondLower">Lower edge along the second axis, Å.</param>
/// <param name="SecondUpper">Upper edge along the second axis, Å.</param>
/// <param name="Side">Cells along each axis.</param>
/// <param name="Density">Density per cell, 1/Å², first-axis index major: cell (i, j) at i·Side + j.</param>
/// <param name="DensityStandardError">Standard error per cell, 1/Å².</param>
/// <param name="Count">The draws counted (those outside the grid included: the density integrates to the share inside).</param>
public sealed record ProjectedDensity(double FirstLower, double FirstUpper, double SecondLower, double SecondUpper, int Side,
    ImmutableArray<double> Density, ImmutableArray<double> DensityStandardError, long Count)
{
    /// <summary>The density of cell (<paramref name="i"/>, <paramref name="j"/>), 1/Å².</summary>
    /// <param name="i">Index along the first axis.</param>
    /// <param name="j">Index along the second axis.</param>
    public double At(int i, int j) => Density[i * Side + j];
}

/// <summary>
/// A site's sampled position distribution beyond its moments: the marginal densities along the three principal axes
/// of the harmonic covariance, the density of the distance from the centre, and the projected density on the plane of
/// the two largest axes, each with standard errors. Coordinates are displacements from <see cref="Centre"/> (the
/// minimum plus the first-order mean shift, fixed before sampling so that chains, lane widths and shards bin alike).
/// </summary>
/// <param name="Centre">The point the densities are taken about, Å.</param>
/// <param name="PrincipalAxes">Three orthonormal axes, largest harmonic variance first (within a degenerate set: the projections of x, y, z).</param>
/// <param name="Marginals">The density along each axis, 1/Å, over ±6 harmonic standard deviations.</param>
/// <param name="ShareOutsideMarginals">Per axis, the share of draws beyond the marginal's range (their density is not shown).</param>
/// <param name="Radial">The density of |x − centre|, 1/Å (of the distance, not per volume).</param>
/// <param name="ShareBeyondRadial">The share of draws beyond the radial range.</param>
/// <param name="Projection">The density on the plane of the first two axes, 1/Å².</param>
/// <param name="ShareOutsideProjection">The share of draws outside the projection's square.</param>
public sealed record SiteDistribution(Position Centre, ImmutableArray<Position> PrincipalAxes, ImmutableArray<Histogram> Marginals,
    ImmutableArray<double> ShareOutsideMarginals, Histogram Radial, double ShareBeyondRadial, ProjectedDensity Projection, double ShareOutsideProjection);

/// <summary>
/// A site's displacement tensors averaged over its point group (<see cref="SiteSymmetry.Symmetrise(System.Collections.Generic.IReadOnlyList{double})"/>):
/// what a refinement constrained by the site symmetry would report. Errors are the jackknife of the averaged values.
/// </summary>
/// <param name="PointGroup">The point group's Schoenflies symbol.</param>
/// <param name="Operations">The number of its operations.</param>
/// <param name="Covariance">The sampled covariance averaged over the group, Å².</param>
/// <param name="ThirdCumulants">The third cumulants averaged over the group (10, the cumulants' order), Å³.</param>
/// <param name="FourthCumulants">The fourth cumulants averaged over the group (15), Å⁴.</param>
public sealed record SymmetrisedTensors(string PointGroup, int Operations, SymmetricTensor Covariance, ImmutableArray<Estimate> ThirdCumulants,
    ImmutableArray<Estimate> FourthCumulants);

/// <summary>Convergence and efficiency diagnostics of a run at one temperature.</summary>
/// <param name="AcceptanceRate">Fraction of accepted Metropolis proposals after burn-in (or of accepted envelope draws for direct site sampling); absent for direct inverse-CDF sampling.</param>
/// <param name="AutocorrelationTime">Integrated autocorrelation time τ of the position, in recorded draws, pooled over chains (N/ESS).</param>
/// <param name="EffectiveSampleSize">Σ over chains of N_c/τ_c.</param>
/// <param name="RHat">Rank-normalised split R-hat (worst coordinate for sites); absent with one chain.</param>
/// <param name="Draws">Recorded draws over all chains.</param>
/// <param name="BlockingStandardError">The standard error of the mean from Flyvbjerg–Petersen blocking (first coordinate for sites), a cross-check of the ESS-based one.</param>
/// <param name="FinalStepWidthInAngstroms">The frozen Metropolis proposal width, averaged over chains; absent for direct sampling.</param>
public sealed record SamplingDiagnostics(double? AcceptanceRate, double AutocorrelationTime, double EffectiveSampleSize, double? RHat, long Draws,
    double BlockingStandardError, double? FinalStepWidthInAngstroms)
{
    /// <summary>The swaps of a replica-exchange ladder this temperature was a rung of; null for an independent run.</summary>
    public ReplicaExchangeDiagnostics? ReplicaExchange { get; init; }
}

/// <summary>
/// One rung of a replica-exchange ladder (<see cref="SamplingSettings.SwapInterval"/>): its swaps with the next-higher
/// rung over the recorded phase, and how freely configurations travelled the whole ladder.
/// </summary>
/// <param name="Rung">The rung's index, 0 the coldest.</param>
/// <param name="LadderInKelvin">Every rung's temperature, K, coldest first.</param>
/// <param name="SwapInterval">Steps between swap attempts.</param>
/// <param name="SwapAcceptance">Accepted over attempted swaps with the next-higher rung; null for the highest rung.</param>
/// <param name="SwapAttempts">Swap attempts with the next-higher rung (0 for the highest).</param>
/// <param name="RoundTrips">Configurations that went from the coldest rung to the hottest and back, counted over every replica set and the recorded phase.</param>
/// <param name="MeanRoundTripSteps">The mean steps such a round trip took; null when none was completed.</param>
public sealed record ReplicaExchangeDiagnostics(int Rung, ImmutableArray<double> LadderInKelvin, long SwapInterval, double? SwapAcceptance, long SwapAttempts,
    long RoundTrips, double? MeanRoundTripSteps);

/// <summary>What produced a result.</summary>
/// <param name="Seed">The run's seed.</param>
/// <param name="Generator">The random generator.</param>
/// <param name="Settings">The sampling settings.</param>
/// <param name="LibraryVersion">The ThermalSampling version.</param>
/// <param name="Landscape">A description of the landscape and potential.</param>
/// <param name="Mass">The particle's mass.</param>
public sealed record Provenance(ulong Seed, string Generator, SamplingSettings Settings, string LibraryVersion, string Landscape, Mass Mass)
{
    /// <summary>The library's informational version.</summary>
    public static string CurrentLibraryVersion => Internal.LibraryVersion.Current;
}

/// <summary>The raw draws kept per chain (see <see cref="SamplingSettings.RetainedDrawsPerChain"/>), in the order they were drawn.</summary>
/// <typeparam name="T">A separation (double, Å) or a position.</typeparam>
/// <param name="Chains">One array per chain.</param>
public sealed record RetainedDraws<T>(ImmutableArray<ImmutableArray<T>> Chains)
{
    /// <summary>No retained draws.</summary>
    public static RetainedDraws<T> None { get; } = new(ImmutableArray<ImmutableArray<T>>.Empty);

    /// <summary>Every <paramref name="every"/>-th draw of each chain, starting with the first (thinning applied when read).</summary>
    /// <param name="every">The thinning interval, at least 1.</param>
    public ImmutableArray<ImmutableArray<T>> Thinned(int every)
    {
        Internal.Preconditions.CheckRange(every, 1, int.MaxValue, nameof(every));
        var result = ImmutableArray.CreateBuilder<ImmutableArray<T>>(Chains.Length);
        foreach (var chain in Chains)
        {
            var b = ImmutableArray.CreateBuilder<T>((chain.Length + every - 1) / every);
            for (int i = 0; i < chain.Length; i += every)
            {
                b.Add(chain[i]);
            }
            result.Add(b.MoveToImmutable());
        }
        return result.MoveToImmutable();
    }
}

/// <summary>The sampled moments compared with the exact quadrature.</summary>
/// <param name="Mean">Exact ⟨r⟩, Å.</param>
/// <param name="Variance">Exact variance, Å².</param>
/// <param name="Skewness">Exact skewness.</param>
/// <param name="ExcessKurtosis">Exact excess kurtosis.</param>
/// <param name="ProbabilityNearWalls">Exact probability within one RMS spread of either wall (the measure of the wall-mass warning).</param>
/// <param name="ZScoreMean">(sampled − exact)/SE for the mean.</param>
/// <param name="ZScoreVariance">(sampled − exact)/SE for the variance.</param>
/// <param name="ThirdCumulant">Exact third cumulant κ3 = skewness·σ³, Å³.</param>
/// <param name="FourthCumulant">Exact fourth cumulant κ4 = excess kurtosis·σ⁴, Å⁴.</param>
public sealed record ExactComparison(double Mean, double Variance, double Skewness, double ExcessKurtosis, double ProbabilityNearWalls, double ZScoreMean, double ZScoreVariance,
    double ThirdCumulant, double FourthCumulant);

/// <summary>One basin of a site's map and its population at a temperature.</summary>
/// <param name="Index">0 the site's basin, 1 … K the other minima by energy, K + 1 the draws that slide to the confinement's wall.</param>
/// <param name="Minimum">The basin's minimum, Å (null for the wall's).</param>
/// <param name="EnergyAboveSiteInElectronVolts">Its energy above the site's minimum, eV (null for the wall's).</param>
/// <param name="SampledShare">The share of recorded draws in it, with the larger of the chain-to-chain and the ESS-based standard error.</param>
/// <param name="HarmonicShare">Harmonic superposition: e^(−E/kT)/√det H normalised over the minima (null for the wall's).</param>
/// <param name="QuadratureShare">The share of Σ e^(−V/kT) over the basin map's points inside the confinement (a grid quadrature at the map's spacing).</param>
public sealed record BasinPopulation(int Index, Position? Minimum, double? EnergyAboveSiteInElectronVolts, Estimate SampledShare, double? HarmonicShare,
    double QuadratureShare)
{
    /// <summary>The mean position of the draws in this basin, Å; null when none fell in it, or when the map has one basin (the report's own mean is then the basin's).</summary>
    public Position? Mean { get; init; }

    /// <summary>The standard errors of <see cref="Mean"/>'s components, Å (jackknife over groups of consecutive draws of every chain; null with fewer than eight groups that visited the basin).</summary>
    public Position? MeanStandardError { get; init; }

    /// <summary>The covariance of the draws in this basin about their own mean, Å².</summary>
    public SymmetricTensor? Covariance { get; init; }

    /// <summary>The mean-square displacement of the draws in this basin about their own mean (the covariance's trace), Å², with its jackknife standard error.</summary>
    public Estimate? MeanSquareDisplacement { get; init; }
}

/// <summary>The vibration report of a line or radial pair at one temperature: the sampled mean, shift, spread and shape with
/// error bars, beside the exact, harmonic and first-order references, the diagnostics and every warning.</summary>
public sealed record PairVibrationReport
{
    /// <summary>The temperature.</summary>
    public required Temperature Temperature { get; init; }

    /// <summary>Line or radial.</summary>
    public required SeparationGeometry Geometry { get; init; }

    /// <summary>The potential's minimum, when it lies inside the window.</summary>
    public required double? MinimumInAngstroms { get; init; }

    /// <summary>Sampled ⟨r⟩, Å.</summary>
    public required Estimate Mean { get; init; }

    /// <summary>⟨r⟩ − minimum, Å (absent without a minimum inside the window).</summary>
    public required Estimate? MeanShift { get; init; }

    /// <summary>Sampled variance, Å².</summary>
    public required Estimate Variance { get; init; }

    /// <summary>Sampled RMS spread, Å.</summary>
    public required Estimate Rms { get; init; }

    /// <summary>Sampled skewness.</summary>
    public required double Skewness { get; init; }

    /// <summary>The mean potential energy above the minimum (or above the lowest energy in the window when no minimum lies in it), ⟨V⟩ − V_min, eV, with its standard error; kT/2 for a harmonic line.</summary>
    public required Estimate PotentialEnergy { get; init; }

    /// <summary>The variance of the potential energy, eV²; Var(V)/(kT)² is the potential part of the heat capacity in units of kB.</summary>
    public required double PotentialEnergyVarianceInElectronVoltsSquared { get; init; }

    /// <summary>Sampled excess kurtosis.</summary>
    public required double ExcessKurtosis { get; init; }

    /// <summary>
    /// The sampled third cumulant κ3 = ⟨(x − ⟨x⟩)³⟩ of the separation, Å³, with its standard error (the jackknife over up to
    /// 32 groups of consecutive draws per chain; NaN with fewer than 8 groups in all).
    /// </summary>
    public required Estimate ThirdCumulant { get; init; }

    /// <summary>The sampled fourth cumulant κ4 = ⟨(x − ⟨x⟩)⁴⟩ − 3Var², Å⁴, with its standard error (as <see cref="ThirdCumulant"/>).</summary>
    public required Estimate FourthCumulant { get; init; }

    /// <summary>
    /// The exact classical density averaged over each bin of <see cref="Histogram"/> (the probability in the bin by
    /// quadrature, over its width), 1/Å: what the sampled histogram estimates, bin for bin.
    /// </summary>
    public required ImmutableArray<double> ExactBinDensity { get; init; }

    /// <summary>
    /// The harmonic (classical) Gaussian about the minimum averaged over each bin of <see cref="Histogram"/>, 1/Å; empty
    /// without a harmonic estimate.
    /// </summary>
    public required ImmutableArray<double> HarmonicBinDensity { get; init; }

    /// <summary>The harmonic estimate (absent without a minimum inside the window).</summary>
    public required PairHarmonicEstimate? Harmonic { get; init; }

    /// <summary>The first-order anharmonic estimate (absent without a minimum inside the window).</summary>
    public required PairFirstOrderEstimate? FirstOrder { get; init; }

    /// <summary>The exact quadrature reference and z-scores.</summary>
    public required ExactComparison Exact { get; init; }

    /// <summary>
    /// The exact quantum distribution on the same window (hard walls), computed where classical statistics fail (a
    /// quantum-effects or de Broglie warning), whose message then gives the quantum spread; null elsewhere.
    /// </summary>
    public required QuantumPairDistribution? QuantumExact { get; init; }

    /// <summary>T(q) at every scattering vector of the settings (<see cref="SamplingSettings.ScatteringVectorsInInverseAngstroms"/>), exact values beside; empty when none was asked for.</summary>
    public required ImmutableArray<TemperatureFactorPoint> TemperatureFactors { get; init; }

    /// <summary>Convergence diagnostics.</summary>
    public required SamplingDiagnostics Diagnostics { get; init; }

    /// <summary>The sampled density.</summary>
    public required Histogram Histogram { get; init; }

    /// <summary>Everything that could mislead, in plain words.</summary>
    public required ImmutableArray<Warning> Warnings { get; init; }

    /// <summary>What produced it.</summary>
    public required Provenance Provenance { get; init; }

    /// <summary>Raw draws kept per chain (empty unless requested).</summary>
    public required RetainedDraws<double> Draws { get; init; }
}

/// <summary>
/// The vibration of a particle at a 3D site at one temperature: the sampled mean, covariance tensor, mean-square
/// displacement and Debye–Waller factor with error bars, the harmonic estimate, the basin of the site's minimum and every
/// warning. When the draws leave the basin (<see cref="StaysAtSite"/> is false) the spread is not a displacement of the
/// site: <see cref="DebyeWallerB"/> and <see cref="IsotropicDisplacement"/> are null and a <c>left-site</c> warning says why.
/// </summary>
public sealed record SiteVibrationReport
{
    /// <summary>The temperature.</summary>
    public required Temperature Temperature { get; init; }

    /// <summary>The energy minimum reached from the centre, Å.</summary>
    public required Position Minimum { get; init; }

    /// <summary>Sampled mean position, Å.</summary>
    public required Position Mean { get; init; }

    /// <summary>Standard errors of the mean's components, Å.</summary>
    public required Position MeanStandardError { get; init; }

    /// <summary>Mean − minimum, Å.</summary>
    public required Position MeanShift { get; init; }

    /// <summary>Sampled displacement covariance about the mean, Å².</summary>
    public required SymmetricTensor Covariance { get; init; }

    /// <summary>tr(covariance) = ⟨|u − ⟨u⟩|²⟩, Å².</summary>
    public required Estimate MeanSquareDisplacement { get; init; }

    /// <summary>
    /// The third cumulant tensor of the displacement, κ_ijk, Å³: its 10 independent components in the order 111, 112,
    /// 113, 122, 123, 133, 222, 223, 233, 333 (1, 2, 3 = x, y, z of the landscape's frame), each with its standard error
    /// (the jackknife over up to 32 groups of consecutive draws per chain; NaN with fewer than 8 groups in all). Zero for
    /// a harmonic (Gaussian) site and for a site with a centre of symmetry.
    /// </summary>
    public required ImmutableArray<Estimate> ThirdCumulants { get; init; }

    /// <summary>
    /// The site's point symmetry found from the landscape (operations about the minimum that map the fixed atoms and the
    /// confinement onto themselves) and the tensor components it forces to zero or to be equal; the sampled tensors agree
    /// with it within their errors.
    /// </summary>
    public required SiteSymmetry Symmetry { get; init; }

    /// <summary>The covariance and cumulant tensors averaged over the site's point group (<see cref="Symmetry"/>), beside the unconstrained ones above.</summary>
    public required SymmetrisedTensors Symmetrised { get; init; }

    /// <summary>
    /// The leading anharmonic terms by classical perturbation theory about the minimum (docs/perturbation-theory.md): the
    /// covariance correction of order (kT)², the third cumulants of order (kT)² and the fourth of order (kT)³.
    /// </summary>
    public required SitePerturbativeEstimate Perturbative { get; init; }

    /// <summary>
    /// The fourth cumulant tensor κ_ijkl = μ_ijkl − μ_ij μ_kl − μ_ik μ_jl − μ_il μ_jk, Å⁴: its 15 independent components in
    /// the order 1111, 1112, 1113, 1122, 1123, 1133, 1222, 1223, 1233, 1333, 2222, 2223, 2233, 2333, 3333, with standard
    /// errors as for <see cref="ThirdCumulants"/>. Zero for a harmonic site.
    /// </summary>
    public required ImmutableArray<Estimate> FourthCumulants { get; init; }

    /// <summary>The mean potential energy above the site's minimum, ⟨V⟩ − V_min, eV, with its standard error; 3kT/2 in the harmonic limit.</summary>
    public required Estimate PotentialEnergy { get; init; }

    /// <summary>The variance of the potential energy, eV²; Var(V)/(kT)² is the potential part of the heat capacity in units of kB.</summary>
    public required double PotentialEnergyVarianceInElectronVoltsSquared { get; init; }

    /// <summary>B = 8π² U_iso = 8π² MSD/3, Å²; null when the particle leaves its site (a B factor describes vibration at a site).</summary>
    public required Estimate? DebyeWallerB { get; init; }

    /// <summary>The harmonic estimate at the minimum.</summary>
    public required SiteHarmonicEstimate Harmonic { get; init; }

    /// <summary>
    /// The exact quantum displacement tensor (<see cref="QuantumSite"/>), computed where classical statistics fail (a
    /// quantum-effects or de Broglie warning, whose message then gives the quantum MSD, or why the temperature is too high
    /// for the reference); null elsewhere and where the reference refuses.
    /// </summary>
    public required QuantumSite? QuantumExact { get; init; }

    /// <summary>T(q) at every scattering vector of the settings (three components each, in the landscape's frame); empty when none was asked for.</summary>
    public required ImmutableArray<TemperatureFactorPoint> TemperatureFactors { get; init; }

    /// <summary>The basin of the site's minimum inside the confinement, with the other minima found and their harmonic weights at this temperature.</summary>
    public required SiteBasin Basin { get; init; }

    /// <summary>Whether the draws stay in the basin of the site's minimum (no more than 0.1 % of them outside it).</summary>
    public bool StaysAtSite => ShareOutsideBasin <= SiteBasins.LeftSiteThreshold;

    /// <summary>The share of recorded draws outside the basin of the site's minimum (each draw placed by the nearest point of the basin map).</summary>
    public required double ShareOutsideBasin { get; init; }

    /// <summary>
    /// Every basin inside the confinement (the site's first, then the other minima by energy, then the draws whose descent
    /// ends at the wall, when any point does) with its population: sampled (with a standard error), harmonic, and by grid
    /// quadrature of the Boltzmann weight over the basin map.
    /// </summary>
    public required ImmutableArray<BasinPopulation> BasinPopulations { get; init; }

    /// <summary>The passes between neighbouring basins (indices as in <see cref="BasinPopulations"/>).</summary>
    public required ImmutableArray<BasinPass> BasinPasses { get; init; }

    /// <summary>Convergence diagnostics.</summary>
    public required SamplingDiagnostics Diagnostics { get; init; }

    /// <summary>Density of the distance from the minimum, 1/Å.</summary>
    public required Histogram RadialHistogram { get; init; }

    /// <summary>The marginal, radial and projected densities about the predicted mean (<see cref="SiteDistribution"/>).</summary>
    public required SiteDistribution Distribution { get; init; }

    /// <summary>Everything that could mislead, in plain words.</summary>
    public required ImmutableArray<Warning> Warnings { get; init; }

    /// <summary>What produced it.</summary>
    public required Provenance Provenance { get; init; }

    /// <summary>Raw positions kept per chain (empty unless requested).</summary>
    public required RetainedDraws<Position> Draws { get; init; }

    /// <summary>U_iso = MSD/3, Å²; null when the particle leaves its site.</summary>
    public Estimate? IsotropicDisplacement => StaysAtSite ? new(MeanSquareDisplacement.Value / 3, MeanSquareDisplacement.StandardError / 3) : null;
}
