using System;
using System.Collections.Generic;
using System.Linq;
using BenchmarkDotNet.Attributes;
using MathNet.Numerics.Distributions;
using MathNet.Numerics.Statistics.Mcmc;
using ThermalSampling.Analysis;
using ThermalSampling.Landscapes;
using ThermalSampling.Potentials;
using ThermalSampling.Randomness;
using ThermalSampling.Sampling;
using ThermalSampling.Statistics;
using ThermalSampling.Units;

namespace ThermalSampling.Benchmarks;

/// <summary>
/// One 1D Lennard-Jones Metropolis step (proposal, energy, accept/reject, running sums), per chain-step, with the two
/// alternatives a user would reach for in the same run: MathNet.Numerics' MetropolisSampler and a plain loop with
/// System.Random and Math.Pow. The library cases go through the public API (PairSampler.Run: 16 chains, every
/// statistic, histogram and diagnostic included), so their time per chain-step includes the run's fixed cost
/// (quadrature, diagnostics), measured on its own by <see cref="PublicApiFixedCost"/>.
/// Invented parameters: u0 = 0.0103 eV, r0 = 3.82 Å, 40 K, window [3.2, 6.0] Å.
/// </summary>
[MemoryDiagnoser]
public class MetropolisStepBenchmarks
{
    private const int Steps = 200_000;
    private const int Chains = 16;
    private const int StepsPerChain = 2_000_000;
    private const double R0 = 3.82, U0 = 0.0103, Lower = 3.2, Upper = 6.0, Width = 0.12;
    private static readonly double Beta = 1 / Temperature.FromKelvin(40).ThermalEnergyInElectronVolts;
    private PairLandscape<LennardJones> _landscape = null!;
    private ExactPairDistribution _exact = null!;
    private InverseCdfTable _table = null!;

    [GlobalSetup]
    public void Setup()
    {
        var lj = LennardJones.FromMinimum(Length.FromAngstroms(R0), Energy.FromElectronVolts(U0));
        _landscape = PairLandscape.Line(lj, Length.FromAngstroms(Lower), Length.FromAngstroms(Upper));
        _exact = ExactPairDistribution.Compute(_landscape, Temperature.FromKelvin(40));
        _table = InverseCdfTable.Build(_exact);
    }

    /// <summary>Building the direct sampler's inverse-CDF table (16 384 cells) from the exact distribution.</summary>
    [Benchmark]
    public InverseCdfTable DirectTableBuild() => InverseCdfTable.Build(_exact);

    /// <summary>One draw from a built table (public InverseCdfTable.Draw), with a running sum.</summary>
    [Benchmark(OperationsPerInvoke = Steps)]
    public double DirectTableDraw()
    {
        var random = RandomStream.FromSeed(1);
        double sum = 0;
        for (int i = 0; i < Steps; i++)
        {
            sum += _table.Draw(ref random);
        }
        return sum;
    }

    private static double LogDensity(double r) =>
        r < Lower || r > Upper ? double.NegativeInfinity : -Beta * U0 * (Math.Pow(R0 / r, 12) - 2 * Math.Pow(R0 / r, 6));

    [Benchmark(Baseline = true, OperationsPerInvoke = Steps)]
    public double MathNetMetropolisSampler()
    {
#pragma warning disable RS0030, CA5394 // baseline only: a user's default choice of generator
        var random = new Random(1);
#pragma warning restore RS0030, CA5394
        var sampler = new MetropolisSampler<double>(R0, LogDensity, x => Normal.Sample(random, x, Width)) { RandomSource = random };
        double sum = 0;
        for (int i = 0; i < Steps; i++)
        {
            sum += sampler.Sample();
        }
        return sum;
    }

    [Benchmark(OperationsPerInvoke = Steps)]
    public double PlainLoopSystemRandom() => Baselines.PlainPairChain(Steps, R0, Width, LogDensity, null);

    private double RunLibrary(int? lanes, int threads, long stepsPerChain = StepsPerChain)
    {
        var settings = new SamplingSettings
        {
            Seed = 1, Chains = Chains, SamplesPerChain = stepsPerChain, BurnIn = 1000, InitialStepWidthInAngstroms = Width,
            ChainsPerVector = lanes, MaxThreads = threads,
        };
        return PairSampler.Run(_landscape, Mass.FromAtomicMassUnits(39.948), Temperature.FromKelvin(40), settings).Mean.Value;
    }

    /// <summary>The widest vector this machine runs natively (8 chains per 512-bit register here), one thread.</summary>
    [Benchmark(OperationsPerInvoke = Chains * StepsPerChain)]
    public double PublicApiVectorOneThread() => RunLibrary(null, 1);

    /// <summary>4 chains per 256-bit register, one thread.</summary>
    [Benchmark(OperationsPerInvoke = Chains * StepsPerChain)]
    public double PublicApi256BitOneThread() => RunLibrary(4, 1);

    /// <summary>The scalar fallback (one chain at a time), one thread.</summary>
    [Benchmark(OperationsPerInvoke = Chains * StepsPerChain)]
    public double PublicApiScalarOneThread() => RunLibrary(1, 1);

    /// <summary>The widest vector, two threads (the machine's two cores).</summary>
    [Benchmark(OperationsPerInvoke = Chains * StepsPerChain)]
    public double PublicApiVectorTwoThreads() => RunLibrary(null, 2);

    /// <summary>The scalar fallback on two threads.</summary>
    [Benchmark(OperationsPerInvoke = Chains * StepsPerChain)]
    public double PublicApiScalarTwoThreads() => RunLibrary(1, 2);

    /// <summary>A run of 16 × 1000 steps: the fixed cost (quadrature, start points, diagnostics) per run, not per step.</summary>
    [Benchmark]
    public double PublicApiFixedCost() => RunLibrary(null, 1, 1000);

    /// <summary>Direct Boltzmann sampling through the public API, per independent draw (the table build included once per run).</summary>
    [Benchmark(OperationsPerInvoke = Chains * StepsPerChain)]
    public double PublicApiDirectOneThread()
    {
        var settings = new SamplingSettings { Seed = 1, Chains = Chains, SamplesPerChain = StepsPerChain, Method = SamplingMethod.Direct, MaxThreads = 1 };
        return PairSampler.Run(_landscape, Mass.FromAtomicMassUnits(39.948), Temperature.FromKelvin(40), settings).Mean.Value;
    }
}

/// <summary>The plain hand-written loop a user would write, shared by the benchmark and the ESS comparison.</summary>
internal static class Baselines
{
    /// <summary>Box–Muller proposals, System.Random, running sums; optionally keeps every position.</summary>
    internal static double PlainPairChain(int steps, double start, double width, Func<double, double> logDensity, double[]? keep)
    {
#pragma warning disable RS0030, CA5394
        var random = new Random(1);
        double r = start, lw = logDensity(r), sum = 0, sum2 = 0;
        for (int i = 0; i < steps; i++)
        {
            double u1 = 1 - random.NextDouble(), u2 = random.NextDouble();
            double proposal = r + width * Math.Sqrt(-2 * Math.Log(u1)) * Math.Cos(2 * Math.PI * u2);
            double lwp = logDensity(proposal);
            if (lwp >= lw || random.NextDouble() < Math.Exp(lwp - lw))
            {
                r = proposal;
                lw = lwp;
            }
            sum += r;
            sum2 += r * r;
            if (keep is not null)
            {
                keep[i] = r;
            }
        }
#pragma warning restore RS0030, CA5394
        return sum + sum2;
    }
}

/// <summary>
/// A particle among fixed Lennard-Jones neighbours: the first 1, 4 and 10 fcc shells (12, 54 and 200 sites), per
/// chain-step. Baseline: the plain loop a user would write (System.Random, Box–Muller, Math.Pow and Math.Sqrt per
/// neighbour). Library: SiteSampler.Run through the public API, 16 chains, everything included.
/// Invented parameters: u0 = 0.0103 eV, r0 = 3.8 Å, 40 K, sphere of 1.5 Å.
/// </summary>
[MemoryDiagnoser]
public class SiteStepBenchmarks
{
    private const int Steps = 50_000;
    private const int Chains = 16;
    private const int StepsPerChain = 1_000_000;
    private const double R0 = 3.8, U0 = 0.0103, Width = 0.08;
    private static readonly double Beta = 1 / Temperature.FromKelvin(40).ThermalEnergyInElectronVolts;
    private double[] _sites = null!;
    private SiteLandscape<LennardJones> _landscape = null!;

    /// <summary>Neighbour shells: 1, 4 and 10 give 12, 54 and 200 sites.</summary>
    [Params(1, 4, 10)]
    public int Shells { get; set; }

    [GlobalSetup]
    public void Setup()
    {
        var lj = LennardJones.FromMinimum(Length.FromAngstroms(R0), Energy.FromElectronVolts(U0));
        var cage = LatticeSites.NeighbourCage(LatticeKind.FaceCentredCubic, Length.FromAngstroms(R0), Shells);
        _landscape = SiteLandscape.Create(lj, cage, Position.Origin, Confinement.Sphere(Length.FromAngstroms(1.5)));
        _sites = new double[cage.Length * 3];
        for (int i = 0; i < cage.Length; i++)
        {
            (_sites[3 * i], _sites[3 * i + 1], _sites[3 * i + 2]) = (cage[i].X, cage[i].Y, cage[i].Z);
        }
    }

    private double PlainEnergy(double x, double y, double z)
    {
        double e = 0;
        for (int i = 0; i < _sites.Length; i += 3)
        {
            double dx = x - _sites[i], dy = y - _sites[i + 1], dz = z - _sites[i + 2];
            double r = Math.Sqrt(dx * dx + dy * dy + dz * dz);
            e += U0 * (Math.Pow(R0 / r, 12) - 2 * Math.Pow(R0 / r, 6));
        }
        return e;
    }

    [Benchmark(Baseline = true, OperationsPerInvoke = Steps)]
    public double PlainLoopSystemRandom()
    {
#pragma warning disable RS0030, CA5394
        var random = new Random(1);
        double x = 0, y = 0, z = 0, e = PlainEnergy(0, 0, 0), sum = 0;
        for (int i = 0; i < Steps; i++)
        {
            double Gauss() => Math.Sqrt(-2 * Math.Log(1 - random.NextDouble())) * Math.Cos(2 * Math.PI * random.NextDouble());
            double px = x + Width * Gauss(), py = y + Width * Gauss(), pz = z + Width * Gauss();
            if (px * px + py * py + pz * pz <= 1.5 * 1.5)
            {
                double ep = PlainEnergy(px, py, pz);
                if (ep <= e || random.NextDouble() < Math.Exp(-Beta * (ep - e)))
                {
                    (x, y, z, e) = (px, py, pz, ep);
                }
            }
            sum += x * x + y * y + z * z;
        }
#pragma warning restore RS0030, CA5394
        return sum;
    }

    private double RunLibrary(int? lanes, int threads, int stepsPerChain = StepsPerChain)
    {
        var settings = new SamplingSettings { Seed = 1, Chains = Chains, SamplesPerChain = stepsPerChain, BurnIn = 2000, ChainsPerVector = lanes, MaxThreads = threads };
        return SiteSampler.Run(_landscape, Mass.FromAtomicMassUnits(39.948), Temperature.FromKelvin(40), settings).MeanSquareDisplacement.Value;
    }

    /// <summary>The widest vector the machine runs natively, one thread.</summary>
    [Benchmark(OperationsPerInvoke = Chains * StepsPerChain)]
    public double PublicApiVectorOneThread() => RunLibrary(null, 1);

    /// <summary>The widest vector, two threads.</summary>
    [Benchmark(OperationsPerInvoke = Chains * StepsPerChain)]
    public double PublicApiVectorTwoThreads() => RunLibrary(null, 2);

    /// <summary>The scalar fallback, one thread.</summary>
    [Benchmark(OperationsPerInvoke = Chains * StepsPerChain)]
    public double PublicApiScalarOneThread() => RunLibrary(1, 1);

    /// <summary>A run of 16 × 1000 steps: the fixed cost per run (harmonic analysis, starts, diagnostics of three coordinates).</summary>
    [Benchmark]
    public double PublicApiFixedCost() => RunLibrary(null, 1, 1000);
}

/// <summary>
/// What recording the displacement's shape costs per site chain-step, in one run: the baseline records only what the
/// recorder kept before the third- and fourth-order cumulant sums and the distribution counts existed (moments, batches,
/// energy and radial histograms); then everything (the default); then everything plus T(q) at four scattering vectors.
/// 12 invented Lennard-Jones neighbours (u0 = 0.0103 eV, r0 = 3.8 Å; the cheapest energy, so the largest share), 40 K,
/// 16 chains, one thread, the widest native vector.
/// </summary>
[MemoryDiagnoser]
public class SiteRecordingCostBenchmarks
{
    private const int Chains = 16;
    private const int StepsPerChain = 1_000_000;
    private SiteLandscape<LennardJones> _landscape = null!;

    [GlobalSetup]
    public void Setup()
    {
        var lj = LennardJones.FromMinimum(Length.FromAngstroms(3.8), Energy.FromElectronVolts(0.0103));
        _landscape = SiteLandscape.Create(lj, LatticeSites.NeighbourCage(LatticeKind.FaceCentredCubic, Length.FromAngstroms(3.8)), Position.Origin,
            Confinement.Sphere(Length.FromAngstroms(1.5)));
    }

    private double Run(bool momentsOnly, double[] waves)
    {
        SiteLaneChains.SiteTally.MomentsOnlyForBenchmarks = momentsOnly;
        try
        {
            var settings = new SamplingSettings { Seed = 1, Chains = Chains, SamplesPerChain = StepsPerChain, BurnIn = 2000, MaxThreads = 1, ScatteringVectorsInInverseAngstroms = [.. waves] };
            return SiteSampler.Run(_landscape, Mass.FromAtomicMassUnits(39.948), Temperature.FromKelvin(40), settings).MeanSquareDisplacement.Value;
        }
        finally
        {
            SiteLaneChains.SiteTally.MomentsOnlyForBenchmarks = false;
        }
    }

    /// <summary>Moments, batches and the radial and energy histograms only.</summary>
    [Benchmark(Baseline = true, OperationsPerInvoke = Chains * StepsPerChain)]
    public double MomentsOnly() => Run(true, []);

    /// <summary>The default: also the 25 third- and fourth-order sums and the five distribution counts.</summary>
    [Benchmark(OperationsPerInvoke = Chains * StepsPerChain)]
    public double CumulantsAndDistribution() => Run(false, []);

    /// <summary>The default plus the temperature factor at four scattering vectors.</summary>
    [Benchmark(OperationsPerInvoke = Chains * StepsPerChain)]
    public double WithFourScatteringVectors() => Run(false, [4, 0, 0, 0, 4, 0, 3, 3, 3, 8, 2, 1]);
}

/// <summary>
/// What a second species costs per site chain-step: the invented 12-neighbour Lennard-Jones cage (u0 = 0.0103 eV,
/// r0 = 3.8 Å, 40 K, sphere of 1.5 Å) with one species (baseline, as LennardJones and as PairForm), against the same
/// cage with its 12 neighbours split into two species of different parameters (6 + 6, PairForm), in one run; 16 chains,
/// one thread, the widest native vector.
/// </summary>
[MemoryDiagnoser]
public class SpeciesCostBenchmarks
{
    private const int Chains = 16;
    private const int StepsPerChain = 1_000_000;
    private SiteLandscape<LennardJones> _one = null!;
    private SiteLandscape<PairForm> _oneForm = null!, _two = null!;
    private SiteLandscape<LennardJones> _twoSameForm = null!;

    [GlobalSetup]
    public void Setup()
    {
        var lj = LennardJones.FromMinimum(Length.FromAngstroms(3.8), Energy.FromElectronVolts(0.0103));
        var other = LennardJones.FromMinimum(Length.FromAngstroms(3.7), Energy.FromElectronVolts(0.0120));
        var cage = LatticeSites.NeighbourCage(LatticeKind.FaceCentredCubic, Length.FromAngstroms(3.8));
        var sphere = Confinement.Sphere(Length.FromAngstroms(1.5));
        _one = SiteLandscape.Create(lj, cage, Position.Origin, sphere);
        _oneForm = SiteLandscape.Create(PairForm.From(lj), cage, Position.Origin, sphere);
        _two = SiteLandscape.CreateWithSpecies(cage.Select((p, i) => (p, i % 2 == 0 ? "A" : "B")),
            new Dictionary<string, PairForm> { ["A"] = PairForm.From(lj), ["B"] = PairForm.From(other) }, Position.Origin, sphere);
        _twoSameForm = SiteLandscape.CreateWithSpecies(cage.Select((p, i) => (p, i % 2 == 0 ? "A" : "B")),
            new Dictionary<string, LennardJones> { ["A"] = lj, ["B"] = other }, Position.Origin, sphere);
    }

    private static double Run<T>(SiteLandscape<T> landscape) where T : struct, IPairPotential
    {
        var settings = new SamplingSettings { Seed = 1, Chains = Chains, SamplesPerChain = StepsPerChain, BurnIn = 2000, MaxThreads = 1 };
        return SiteSampler.Run(landscape, Mass.FromAtomicMassUnits(39.948), Temperature.FromKelvin(40), settings).MeanSquareDisplacement.Value;
    }

    /// <summary>One species, the Lennard-Jones type itself.</summary>
    [Benchmark(Baseline = true, OperationsPerInvoke = Chains * StepsPerChain)]
    public double OneSpecies() => Run(_one);

    /// <summary>One species through PairForm.</summary>
    [Benchmark(OperationsPerInvoke = Chains * StepsPerChain)]
    public double OneSpeciesPairForm() => Run(_oneForm);

    /// <summary>Two species, 6 + 6 neighbours, through PairForm.</summary>
    [Benchmark(OperationsPerInvoke = Chains * StepsPerChain)]
    public double TwoSpecies() => Run(_two);

    /// <summary>Two species of one form (Lennard-Jones with two parameter sets), 6 + 6 neighbours: what the command uses when every pair has the same form.</summary>
    [Benchmark(OperationsPerInvoke = Chains * StepsPerChain)]
    public double TwoSpeciesSameForm() => Run(_twoSameForm);
}

/// <summary>
/// What the Coulomb term costs per site chain-step: an invented ionic site (a rock-salt-like cell, a = 5 Å, charges ±1 e;
/// six Cl neighbours with an invented Buckingham repulsion), without the Coulomb term (baseline) and with it (the
/// degree-8 polynomial fit of the Ewald field, 165 terms), in one run; 16 chains, one thread, the widest native vector.
/// </summary>
[MemoryDiagnoser]
public class CoulombCostBenchmarks
{
    private const int Chains = 16;
    private const int StepsPerChain = 500_000;
    private SiteLandscape<Buckingham> _plain = null!, _charged = null!;

    [GlobalSetup]
    public void Setup()
    {
        var salt = new Structure([.. new (string S, double X, double Y, double Z)[] { ("Na", 0, 0, 0), ("Na", 0, 0.5, 0.5), ("Na", 0.5, 0, 0.5), ("Na", 0.5, 0.5, 0),
                ("Cl", 0.5, 0, 0), ("Cl", 0, 0.5, 0), ("Cl", 0, 0, 0.5), ("Cl", 0.5, 0.5, 0.5) }
                .Select(f => new StructureAtom(f.S, new Position(5.0 * f.X, 5.0 * f.Y, 5.0 * f.Z)))],
            [new Position(5, 0, 0), new Position(0, 5, 0), new Position(0, 0, 5)], "invented");
        var neighbours = salt.NeighboursOf(0, Length.FromAngstroms(2.6)).Select(n => n.Position).ToList();
        var buck = new Buckingham(Energy.FromElectronVolts(1000), Length.FromAngstroms(0.3), 0);
        _plain = SiteLandscape.Create(buck, neighbours, Position.Origin, Confinement.Sphere(Length.FromAngstroms(0.5)));
        _charged = _plain.WithField(CoulombSite.Field(salt, 0, new Dictionary<string, double> { ["Na"] = 1, ["Cl"] = -1 }, 0.55));
    }

    private static double Run(SiteLandscape<Buckingham> landscape)
    {
        var settings = new SamplingSettings { Seed = 1, Chains = Chains, SamplesPerChain = StepsPerChain, BurnIn = 2000, MaxThreads = 1 };
        return SiteSampler.Run(landscape, Mass.FromAtomicMassUnits(23), Temperature.FromKelvin(100), settings).MeanSquareDisplacement.Value;
    }

    /// <summary>Short-range pairs only.</summary>
    [Benchmark(Baseline = true, OperationsPerInvoke = Chains * StepsPerChain)]
    public double WithoutCoulomb() => Run(_plain);

    /// <summary>With the Coulomb term's polynomial.</summary>
    [Benchmark(OperationsPerInvoke = Chains * StepsPerChain)]
    public double WithCoulomb() => Run(_charged);
}
