namespace ThermalSampling.Analysis;

/// <summary>A plain-language warning attached to a result: a stable machine-readable code and a message for people.</summary>
/// <param name="Code">A stable code from <see cref="WarningCodes"/>.</param>
/// <param name="Message">What was found, why it matters, and what to do.</param>
public sealed record Warning(string Code, string Message);

/// <summary>The stable warning codes. They are part of the public contract.</summary>
public static class WarningCodes
{
    /// <summary>ħω/kT is large enough that quantum statistics change the spread noticeably.</summary>
    public const string QuantumEffects = "quantum-effects";

    /// <summary>The thermal de Broglie wavelength is comparable to or larger than the RMS spread.</summary>
    public const string DeBroglieWavelength = "de-broglie-wavelength";

    /// <summary>kT is a sizeable fraction of the well depth: the particle may escape its well.</summary>
    public const string EscapeRisk = "escape-risk";

    /// <summary>Draws were found outside the basin of the site's minimum: the particle left its site, so no B factor or harmonic comparison is given.</summary>
    public const string LeftSite = "left-site";

    /// <summary>Noticeable probability sits next to a wall: the answer depends on where the window is.</summary>
    public const string WallMass = "wall-mass";

    /// <summary>The potential's minimum lies outside the window or confinement; harmonic and perturbative estimates do not apply.</summary>
    public const string MinimumOutsideWindow = "minimum-outside-window";

    /// <summary>The first-order perturbative estimate is outside its range of validity (its correction is not small).</summary>
    public const string PerturbationInvalid = "perturbation-invalid";

    /// <summary>Rank-normalised split R-hat is above 1.01: the chains disagree, so they have not converged or not mixed.</summary>
    public const string RHatHigh = "r-hat-high";

    /// <summary>The effective sample size is below 400: error bars are themselves uncertain.</summary>
    public const string LowEffectiveSampleSize = "low-effective-sample-size";

    /// <summary>A chain is shorter than 50 autocorrelation times: its autocorrelation time and error bar are not trustworthy.</summary>
    public const string ShortChain = "short-chain";

    /// <summary>The Metropolis acceptance rate is far from its target: the proposal width was not tuned well during burn-in.</summary>
    public const string AcceptanceOffTarget = "acceptance-off-target";

    /// <summary>The sampled mean or variance differs from the exact quadrature value by more than 4 standard errors.</summary>
    public const string DisagreesWithExact = "disagrees-with-exact";

    /// <summary>More than 0.1 % of a site's draws fell outside its distribution histograms' range (±6 harmonic standard deviations): the well is wider than its harmonic estimate.</summary>
    public const string BeyondDistributionRange = "beyond-distribution-range";

    /// <summary>A path-integral result still changes with the number of beads beyond its tolerance: raise the beads.</summary>
    public const string QuantumBeadsNotConverged = "quantum-beads-not-converged";

    /// <summary>Over a sweep, a site's population moves between basins (a share changes by more than 0.1, or the most populated basin changes).</summary>
    public const string BasinPopulationShift = "basin-population-shift";

    /// <summary>A replica-exchange rung swapped with its next-higher neighbour in fewer than 5 % of attempts: the ladder is too sparse there.</summary>
    public const string SwapAcceptanceLow = "swap-acceptance-low";

    /// <summary>No configuration of a replica-exchange ladder went from the coldest rung to the hottest and back during the recorded phase: the cold rungs may not have mixed.</summary>
    public const string LadderNoRoundTrips = "ladder-no-round-trips";
}
