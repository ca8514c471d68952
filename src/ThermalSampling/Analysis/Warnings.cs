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

    /// <summary>Noticeable probability sits next to a wall: the answer depends on where the window is.</summary>
    public const string WallMass = "wall-mass";

    /// <summary>The potential's minimum lies outside the window or confinement; harmonic and perturbative estimates do not apply.</summary>
    public const string MinimumOutsideWindow = "minimum-outside-window";

    /// <summary>The first-order perturbative estimate is outside its range of validity (its correction is not small).</summary>
    public const string PerturbationInvalid = "perturbation-invalid";
}
