using System;
using System.Linq;
using ThermalSampling.Analysis;
using ThermalSampling.Landscapes;
using ThermalSampling.Potentials;
using ThermalSampling.Reports;
using ThermalSampling.Sampling;
using ThermalSampling.Units;
using Xunit;

namespace ThermalSampling.Tests;

/// <summary>The sampled generalised temperature factor T(q) = ⟨exp(iq·(x − ⟨x⟩))⟩ against closed forms and exact quadrature.</summary>
public class TemperatureFactorSamplingTests
{
    /// <summary>
    /// Line and radial pairs in an invented Morse well (0.5 eV, 1.5/Å, 2.5 Å) at 600 K: the sampled Re T and Im T agree
    /// with the exact quadrature (ExactPairDistribution.TemperatureFactor, MathNet Gauss–Kronrod) within 4 standard errors
    /// at q = 1, 4, 8 and 14 1/Å, by Metropolis and by direct draws; the harmonic factor is exp(−q²σ_h²/2) with
    /// σ_h² = kT/V''(r0) (closed form).
    /// </summary>
    [Theory]
    [InlineData("line", SamplingMethod.Metropolis)]
    [InlineData("radial", SamplingMethod.Metropolis)]
    [InlineData("line", SamplingMethod.Direct)]
    public void Pair_temperature_factor_agrees_with_exact_quadrature(string geometry, SamplingMethod method)
    {
        var morse = new Morse(Energy.FromElectronVolts(0.5), 1.5, Length.FromAngstroms(2.5));
        var landscape = geometry == "line"
            ? PairLandscape.Line(morse, Length.FromAngstroms(1.9), Length.FromAngstroms(4.5))
            : PairLandscape.Radial(morse, Length.FromAngstroms(1.9), Length.FromAngstroms(4.5));
        double[] qs = [1, 4, 8, 14];
        var settings = new SamplingSettings { Seed = 31, Chains = 4, SamplesPerChain = 200_000, BurnIn = 5000, Method = method, ScatteringVectorsInInverseAngstroms = [.. qs] };
        var t = Temperature.FromKelvin(600);
        var r = PairSampler.Run(landscape, Mass.FromAtomicMassUnits(30), t, settings);
        Assert.Equal(qs.Length, r.TemperatureFactors.Length);
        double sigma2 = t.ThermalEnergyInElectronVolts / (2 * 0.5 * 1.5 * 1.5); // Morse: V''(r0) = 2Da²
        foreach (var (p, q) in r.TemperatureFactors.Zip(qs))
        {
            Assert.Equal(q, p.ScatteringVector.Single());
            Assert.InRange((p.Real.Value - p.ExactReal!.Value) / p.Real.StandardError, -4, 4);
            Assert.InRange((p.Imaginary.Value - p.ExactImaginary!.Value) / p.Imaginary.StandardError, -4, 4);
            Assert.Equal(Math.Exp(-0.5 * q * q * sigma2), p.Harmonic!.Value, 1e-9);
            Assert.True(p.Real.StandardError > 0 && p.Real.StandardError < 0.02, $"q = {q}: SE {p.Real.StandardError}");
        }
        // A Morse well is skewed: at q = 8 1/Å the sampled T departs from the Gaussian of its own covariance beyond its error.
        Assert.True(r.TemperatureFactors[2].GaussianFails, "the anharmonic well's T(8/Å) is not Gaussian");
    }

    /// <summary>
    /// A harmonic site: six invented springs V = ½k(r − r0)² (k = 1 eV/Å², r0 = 1e−6 Å, so V = ½k r² to 1e−6 relative)
    /// to the corners of an octahedron 2 Å out sum to the isotropic well 3k|u|², whose distribution is the Gaussian with
    /// U = kT/(6k)·I (closed form). T(Q) = exp(−½ QᵀUQ) with no imaginary part, within 4 standard errors; the third and
    /// fourth cumulants vanish within 4.5; the harmonic factor equals the closed form.
    /// </summary>
    [Fact]
    public void Harmonic_site_temperature_factor_is_gaussian_and_its_higher_cumulants_vanish()
    {
        var spring = new HarmonicBond(1.0, Length.FromAngstroms(1e-6));
        Position[] octahedron = [new(2, 0, 0), new(-2, 0, 0), new(0, 2, 0), new(0, -2, 0), new(0, 0, 2), new(0, 0, -2)];
        var site = SiteLandscape.Create(spring, octahedron, Position.Origin, Confinement.Sphere(Length.FromAngstroms(1.0)));
        var t = Temperature.FromKelvin(300);
        double u = t.ThermalEnergyInElectronVolts / 6.0;
        Position[] qs = [new(3, 0, 0), new(2, 2, 1), new(0, 0, 8), ScatteringVector.FromSinThetaOverLambda(0.5, new Position(1, 1, 1))];
        var settings = new SamplingSettings
        {
            Seed = 5, Chains = 8, SamplesPerChain = 100_000, BurnIn = 5000,
            ScatteringVectorsInInverseAngstroms = [.. qs.SelectMany(q => new[] { q.X, q.Y, q.Z })],
        };
        var r = SiteSampler.Run(site, Mass.FromAtomicMassUnits(20), t, settings);
        Assert.Equal(qs.Length, r.TemperatureFactors.Length);
        foreach (var (p, q) in r.TemperatureFactors.Zip(qs))
        {
            double closed = Math.Exp(-0.5 * u * (q.X * q.X + q.Y * q.Y + q.Z * q.Z));
            Assert.Equal(closed, p.Harmonic!.Value, 1e-5);
            Assert.InRange((p.Real.Value - closed) / p.Real.StandardError, -4, 4);
            Assert.InRange(p.Imaginary.Value / p.Imaginary.StandardError, -4, 4);
            Assert.InRange(p.DepartureFromGaussian.Value / p.DepartureFromGaussian.StandardError, -4.5, 4.5);
        }
        Assert.All(r.ThirdCumulants.Concat(r.FourthCumulants), k => Assert.InRange(k.Value / k.StandardError, -4.5, 4.5));
        Assert.Equal(u, r.Covariance.XX, 0.03 * u);
        Assert.Equal(u, r.Covariance.ZZ, 0.03 * u);
    }

    /// <summary>sin θ/λ converts to |Q| = 4π sin θ/λ (the diffraction convention) along the given direction; bad input is refused by name.</summary>
    [Fact]
    public void Scattering_vectors_from_sin_theta_over_lambda()
    {
        var q = ScatteringVector.FromSinThetaOverLambda(0.5, new Position(0, 3, 4));
        Assert.Equal(4 * Math.PI * 0.5, q.Norm, 1e-12);
        Assert.Equal(0.6 * q.Norm, q.Y, 1e-12);
        Assert.Equal(2 * Math.PI, ScatteringVector.MagnitudeFromSinThetaOverLambda(0.5), 1e-12);
        Assert.Equal("direction", Assert.Throws<ArgumentOutOfRangeException>(() => ScatteringVector.FromSinThetaOverLambda(0.5, Position.Origin)).ParamName);
        Assert.Equal("sinThetaOverLambdaInInverseAngstroms", Assert.Throws<ArgumentOutOfRangeException>(() => ScatteringVector.FromSinThetaOverLambda(-1, new Position(1, 0, 0))).ParamName);
        var ex = Assert.Throws<ArgumentException>(() => SiteSampler.Run(InventedLandscapes.Cage, Mass.FromAtomicMassUnits(20), Temperature.FromKelvin(30),
            new SamplingSettings { Seed = 1, SamplesPerChain = 100, ScatteringVectorsInInverseAngstroms = [1, 2] }));
        Assert.Contains("ScatteringVectorsInInverseAngstroms has 2 values", ex.Message);
        Assert.Contains("ScatteringVectorsInInverseAngstroms = 10000 is out of range; valid: at most 192 values, each finite and between −1000 and 1000",
            Assert.Throws<ArgumentException>(() => new SamplingSettings { Seed = 1, ScatteringVectorsInInverseAngstroms = [1e4] }.Validate()).Message);
    }
}
