using System;
using System.Collections.Generic;
using System.Globalization;
using System.Linq;

namespace ThermalSampling.Sampling;

/// <summary>How positions are drawn.</summary>
public enum SamplingMethod
{
    /// <summary>Random-walk Metropolis with Gaussian proposals; the width adapts during burn-in only, then freezes.</summary>
    Metropolis,

    /// <summary>Independent draws from the Boltzmann distribution: inverse CDF (line, radial) or rejection from a Gaussian envelope (sites).</summary>
    Direct,
}

/// <summary>
/// Settings of a sampling run. Every value is explicit: nothing is silently substituted. <see cref="Validate"/>
/// reports every problem at once.
/// </summary>
public sealed record SamplingSettings
{
    /// <summary>The run's seed; chain c uses <see cref="Randomness.RandomStream.ForChain"/>(Seed, c).</summary>
    public required ulong Seed { get; init; }

    /// <summary>The sampling method.</summary>
    public SamplingMethod Method { get; init; } = SamplingMethod.Metropolis;

    /// <summary>Number of independent chains, 1 to 1024 (at least 2 for R-hat).</summary>
    public int Chains { get; init; } = 4;

    /// <summary>Recorded draws per chain, after burn-in, 10 to 10^12.</summary>
    public long SamplesPerChain { get; init; } = 100_000;

    /// <summary>Steps per chain discarded before recording, during which the Metropolis width adapts; 0 to 10^12.</summary>
    public long BurnIn { get; init; } = 10_000;

    /// <summary>Target acceptance rate of the Metropolis width adaptation, in (0, 1); null means 0.44 for one coordinate
    /// and 0.31 for three (Roberts, Gelman &amp; Gilks 1997; Roberts &amp; Rosenthal 2001; the 3D value recalled from memory).</summary>
    public double? TargetAcceptance { get; init; }

    /// <summary>The initial proposal width (Å) per coordinate; null means the harmonic RMS spread (or a tenth of the window).</summary>
    public double? InitialStepWidthInAngstroms { get; init; }

    /// <summary>Histogram bins, 4 to 10 000.</summary>
    public int HistogramBins { get; init; } = 60;

    /// <summary>
    /// How far a site's distribution histograms reach each side of the predicted mean, in harmonic standard deviations
    /// along each principal axis (the radial one: of the widest axis), 2 to 100 (default 6); never past the confinement.
    /// Draws beyond are counted as outside (their share is reported, and above 0.1 % warned about).
    /// </summary>
    public double SiteDistributionHalfWidthInSigmas { get; init; } = 6;

    /// <summary>The most values kept per chain for autocorrelation, blocking and R-hat, 64 to 10^7 (default 16 384). Longer
    /// chains keep the means of consecutive batches of draws instead (exact for error bars at any batch size), so memory per
    /// chain is constant. More values make the error bars' own uncertainty smaller (about √(2(2W + 1)/M) relative for a
    /// summation window W over M values: 5% at the default with W = 10) and the diagnostics slower.</summary>
    public int MaxDiagnosticValuesPerChain { get; init; } = 1 << 14;

    /// <summary>How many raw draws of each chain to keep in the report, 0 to 10^7 (the first ones after burn-in, in order);
    /// read them thinned with <see cref="Reports.RetainedDraws{T}.Thinned"/>. Statistics always use every draw.</summary>
    public int RetainedDrawsPerChain { get; init; }

    /// <summary>
    /// Scattering vectors at which to record the generalised temperature factor T(q) = ⟨exp(iq·(x − ⟨x⟩))⟩ from every
    /// draw, Å⁻¹: for a pair one value per q, for a site three values (q_x, q_y, q_z) per vector (build one from sin θ/λ
    /// with <see cref="Analysis.ScatteringVector.FromSinThetaOverLambda"/>). At most 192 values, each finite with
    /// |q| ≤ 1000 Å⁻¹; empty (the default) records none and costs nothing per step.
    /// </summary>
    public System.Collections.Immutable.ImmutableArray<double> ScatteringVectorsInInverseAngstroms { get; init; } = [];

    /// <summary>The largest scattering-vector component, Å⁻¹ (<see cref="ScatteringVectorsInInverseAngstroms"/>).</summary>
    public const double MaxScatteringVectorInInverseAngstroms = 1000;

    /// <summary>
    /// Replica exchange (parallel tempering): a sweep's temperatures become one ladder whose neighbouring rungs offer to
    /// exchange configurations every <see cref="SwapInterval"/> steps (burn-in included), 1 to 10^6, Metropolis only.
    /// Rung k's chain c swaps with rung k ± 1's chain c, so each rung keeps <see cref="Chains"/> chains and its report has
    /// the usual form, with the swaps in <see cref="Reports.SamplingDiagnostics.ReplicaExchange"/>. Null (the default):
    /// every temperature is an independent run.
    /// </summary>
    public int? SwapInterval { get; init; }

    /// <summary>Worker threads, 1 to 1024; null means the processor count. Results do not depend on it.</summary>
    public int? MaxThreads { get; init; }

    /// <summary>
    /// Metropolis chains advanced together in one vector register: 1, 2, 4 or 8; null picks the widest the hardware runs
    /// natively that still leaves every thread a register's worth of chains. Every chain's draws are the same bits at any
    /// value, so this changes speed only (a width the hardware lacks still works, slowly). Direct sampling ignores it.
    /// </summary>
    public int? ChainsPerVector { get; init; }

    /// <summary>Whether every setting is the same (value for value, the scattering vectors included), by the one list of fields.</summary>
    /// <param name="other">The settings to compare with.</param>
    public bool Equals(SamplingSettings? other)
        => other is not null && (ReferenceEquals(this, other) || SettingsFields.All.All(f => f.Text(this) == f.Text(other)));

    /// <inheritdoc/>
    public override int GetHashCode()
    {
        var hash = new HashCode();
        foreach (var f in SettingsFields.All)
        {
            hash.Add(f.Text(this), StringComparer.Ordinal);
        }
        return hash.ToHashCode();
    }

    /// <summary>Throws one <see cref="ArgumentException"/> listing every invalid setting.</summary>
    public void Validate()
    {
        var errors = SettingsFields.Problems(this).ToList(); // every field's range is declared once, in SettingsFields
        if (errors.Count > 0)
        {
            throw new ArgumentException("Invalid sampling settings: " + string.Join(" ", errors), "settings");
        }
    }
}

/// <summary>Progress of a run: about 200 reports per chain (at most one per 4096 steps) and one when a chain finishes.</summary>
/// <param name="ChainIndex">The chain that reported.</param>
/// <param name="ChainStepsDone">Steps this chain has done (burn-in included).</param>
/// <param name="ChainStepsTotal">Steps this chain will do.</param>
/// <param name="TemperatureInKelvin">The temperature being sampled, K.</param>
public readonly record struct SamplingProgress(int ChainIndex, long ChainStepsDone, long ChainStepsTotal, double TemperatureInKelvin);
