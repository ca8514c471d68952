namespace ThermalSampling.Tests;

/// <summary>
/// The published references the tests check against, named exactly as in the project's list of
/// validation sources. [paper] published; [memory] recalled, generous tolerances;
/// [common practice] a fact of the trade with no single source.
/// </summary>
internal static class Sources
{
    public const string Codata2018 = "[paper] CODATA 2018 recommended values (Tiesinga et al., Rev. Mod. Phys. 93, 025010 (2021))";
    public const string LennardJonesDerivatives = "[common practice; derivable by hand] LJ V''(r_min) = 72 eps/r_min^2, V'''(r_min) = -1512 eps/r_min^3, V''''(r_min) = 26712 eps/r_min^4";
    public const string MorseDerivatives = "[common practice] Morse V'' = 2Da^2, V''' = -6Da^3, V'''' = 14Da^4 at re";
    public const string ClassicalPerturbation = "[textbook] classical 1D perturbation theory; Kittel, Introduction to Solid State Physics, chapter on anharmonic effects";
    public const string RadialPerturbation = "[derived in docs/perturbation-theory.md; checked against quadrature]";
    public const string QuantumOscillator = "[textbook] quantum harmonic oscillator <x^2> = (hbar/2m omega) coth(hbar omega/2kT)";
    public const string WignerKirkwood = "[paper] Wigner 1932; Kirkwood 1933";
    public const string DebyeWaller = "[paper] IUCr conventions; Trueblood et al., Acta Cryst. A52, 770 (1996)";
    public const string DeBroglie = "[common practice] thermal de Broglie wavelength h/sqrt(2 pi m kB T)";
    public const string LorentzBerthelot = "[paper] Lorentz 1881; Berthelot 1898";
    public const string Buckingham = "[memory] Lewis & Catlow, J. Phys. C 18, 1149 (1985): O-O barrier near 0.87 A, spurious minimum near 1.24 A";
    public const string GirifalcoWeizer = "[paper] Girifalco & Weizer, Phys. Rev. 114, 687 (1959); Fe checked against a copy of the table, others from memory";
    /// <summary>Recalled from memory: the values are widely tabulated, but which paper first gave them is not checked (an attribution to
    /// Rowley, Nicholson &amp; Parsonage 1975 was doubtful and is withdrawn). Used only as a realistic parameter set in tests.</summary>
    public const string Argon = "[memory] argon Lennard-Jones eps/kB = 119.8 K, sigma = 3.405 A: widely tabulated, attribution to a specific paper not checked";
    public const string SqrtT = "[common practice, no source] harmonic RMS spread proportional to sqrt(T)";
    public const string LightAtoms = "[common practice, no source] light atoms are not classical particles in a typical well";
    public const string FiniteWell = "[common practice, no source] a finite-depth well is not normalisable without a window";
    public const string Lattices = "[common practice, no source] coordination shells of fcc (12, 6, 24), bcc (8, 6, 12), sc (6, 12, 8), ideal hcp (12, 6)";
}
