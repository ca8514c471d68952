using System;
using System.Linq;
using System.Runtime.Intrinsics;
using ThermalSampling.Analysis;
using ThermalSampling.Statistics;
using ThermalSampling.Numerics;
using ThermalSampling.Landscapes;
using ThermalSampling.Potentials;
using ThermalSampling.Randomness;
using ThermalSampling.Reports;
using ThermalSampling.Sampling;
using ThermalSampling.Units;
using Xunit;

namespace ThermalSampling.Tests;

/// <summary>
/// The multi-chain (vector lane) Metropolis kernels: the lane exponential against Math.Exp, the lane generator against
/// the scalar stream, bit-for-bit agreement across lane widths and thread counts, and the sampled moments against
/// exact quadrature (MathNet Gauss–Legendre through ExactPairDistribution).
/// </summary>
public sealed class LaneKernelTests
{
    private static readonly Mass ArgonMass = Mass.FromAtomicMassUnits(39.948);
    private static readonly Mass IronMass = Mass.FromAtomicMassUnits(55.845);
    private static readonly LennardJones Lj = LennardJones.FromMinimum(Length.FromAngstroms(3.8), Energy.FromKelvin(119.8)); // Sources.Argon (eps)
    private static readonly Morse Iron = new(Energy.FromElectronVolts(0.4174), 1.3885, Length.FromAngstroms(2.845)); // Sources.GirifalcoWeizer
    private static readonly Buckingham OxygenOxygen = new(Energy.FromElectronVolts(22764.0), Length.FromAngstroms(0.149), 27.88); // Sources.Buckingham

    private static double Exp8(double x) => LaneMath.Exp<Lanes8, Vector512<double>, Vector512<ulong>>(Vector512.Create(x)).GetElement(3);

    private static double Exp4(double x) => LaneMath.Exp<Lanes4, Vector256<double>, Vector256<ulong>>(Vector256.Create(x)).GetElement(1);

    private static double Exp2(double x) => LaneMath.Exp<Lanes2, Vector128<double>, Vector128<ulong>>(Vector128.Create(x)).GetElement(1);

    private static double Exp1(double x) => LaneMath.Exp<Lanes1, double, ulong>(x);

    /// <summary>Reference: Math.Exp (the platform's correctly rounded or near-correctly rounded libm exp).</summary>
    [Fact]
    public void LaneExponentialIsWithin1e15OfMathExpOverItsRange()
    {
        var random = RandomStream.FromSeed(7);
        double worst = 0;
        for (int i = 0; i < 400_000; i++)
        {
            // Uniform over the whole range, plus the small arguments the acceptance test sees most.
            double x = i % 2 == 0 ? LaneMath.ExpLowerLimit + (LaneMath.ExpUpperLimit - LaneMath.ExpLowerLimit) * random.NextUnitInterval() : -20 * random.NextUnitInterval();
            double reference = Math.Exp(x);
            double relative = Math.Abs(Exp1(x) - reference) / reference;
            worst = Math.Max(worst, relative);
        }
        foreach (double x in new[] { -708.0, -707.9, -1e-300, 0.0, 1e-300, 1e-8, 0.5 * Math.Log(2), Math.Log(2), 1.0, 100.0, 708.9, 709.0 })
        {
            worst = Math.Max(worst, Math.Abs(Exp1(x) - Math.Exp(x)) / Math.Exp(x));
        }
        Assert.True(worst <= 1e-15, $"worst relative error {worst:G3}");
        Assert.Equal(1.0, Exp1(0.0));
    }

    private static (double Sin, double Cos) SinCos1(double x) => (LaneMath.SinCos<Lanes1, double, ulong>(x, out var c), c);

    /// <summary>Reference: Math.Sin and Math.Cos (the platform's libm), over the documented range and at the quadrant edges.</summary>
    [Fact]
    public void LaneSineAndCosineAreWithin1e15OfMathOverTheirRange()
    {
        var random = RandomStream.FromSeed(17);
        double worst = 0;
        for (int i = 0; i < 400_000; i++)
        {
            double x = i % 3 switch { 0 => -10 + 20 * random.NextUnitInterval(), 1 => -1e3 + 2e3 * random.NextUnitInterval(), _ => -1e6 + 2e6 * random.NextUnitInterval() };
            var (s, c) = SinCos1(x);
            worst = Math.Max(worst, Math.Max(Math.Abs(s - Math.Sin(x)), Math.Abs(c - Math.Cos(x))));
        }
        for (int k = -8; k <= 8; k++)
        {
            foreach (double x in new[] { k * Math.PI / 4, k * Math.PI / 2, Math.BitDecrement(k * Math.PI / 4), Math.BitIncrement(k * Math.PI / 4) })
            {
                var (s, c) = SinCos1(x);
                worst = Math.Max(worst, Math.Max(Math.Abs(s - Math.Sin(x)), Math.Abs(c - Math.Cos(x))));
            }
        }
        Assert.True(worst <= 1e-15, $"worst absolute error {worst:G3}");
        Assert.Equal((0.0, 1.0), SinCos1(0.0));
    }

    [Fact]
    public void LaneSineAndCosineGiveTheSameBitsAtEveryWidth()
    {
        var random = RandomStream.FromSeed(18);
        for (int i = 0; i < 20_000; i++)
        {
            double x = -1e4 + 2e4 * random.NextUnitInterval();
            var (s, c) = SinCos1(x);
            double s8 = LaneMath.SinCos<Lanes8, Vector512<double>, Vector512<ulong>>(Vector512.Create(x), out var c8).GetElement(5);
            double s4 = LaneMath.SinCos<Lanes4, Vector256<double>, Vector256<ulong>>(Vector256.Create(x), out var c4).GetElement(2);
            double s2 = LaneMath.SinCos<Lanes2, Vector128<double>, Vector128<ulong>>(Vector128.Create(x), out var c2).GetElement(1);
            Assert.Equal((s, c), (s8, c8.GetElement(5)));
            Assert.Equal((s, c), (s4, c4.GetElement(2)));
            Assert.Equal((s, c), (s2, c2.GetElement(1)));
        }
    }

    [Fact]
    public void LaneExponentialIsZeroBelowItsRangeAndSaturatesAbove()
    {
        Assert.Equal(0.0, Exp1(-708.0000001));
        Assert.Equal(0.0, Exp1(double.NegativeInfinity));
        Assert.Equal(Exp1(709.0), Exp1(750.0));
        Assert.Equal(Exp1(709.0), Exp1(double.PositiveInfinity));
        Assert.True(double.IsFinite(Exp1(709.0)));
    }

    [Fact]
    public void LaneExponentialGivesTheSameBitsAtEveryWidth()
    {
        var random = RandomStream.FromSeed(8);
        for (int i = 0; i < 20_000; i++)
        {
            double x = -720 + 1440 * random.NextUnitInterval();
            double one = Exp1(x);
            Assert.Equal(one, Exp2(x));
            Assert.Equal(one, Exp4(x));
            Assert.Equal(one, Exp8(x));
        }
    }

    [Fact]
    public void LaneGeneratorReproducesTheScalarStreamInEveryLane()
    {
        Span<ulong> words = stackalloc ulong[4];
        Vector512<ulong> s0 = default, s1 = default, s2 = default, s3 = default;
        var streams = new RandomStream[8];
        for (int lane = 0; lane < 8; lane++)
        {
            streams[lane] = RandomStream.ForChain(99, lane);
            streams[lane].GetState(words);
            s0 = s0.WithElement(lane, words[0]);
            s1 = s1.WithElement(lane, words[1]);
            s2 = s2.WithElement(lane, words[2]);
            s3 = s3.WithElement(lane, words[3]);
        }
        for (int step = 0; step < 1000; step++)
        {
            var bits = LaneMath.NextBits<Lanes8, Vector512<double>, Vector512<ulong>>(ref s0, ref s1, ref s2, ref s3);
            for (int lane = 0; lane < 8; lane++)
            {
                Assert.Equal(streams[lane].NextUInt64(), bits.GetElement(lane));
            }
        }
    }

    [Fact]
    public void LaneUniformsAreInTheUnitIntervalWith52Bits()
    {
        ulong a = 0, b = 0, c = 0, d = 0x8000000000000000UL;
        double u = LaneMath.NextUnit<Lanes1, double, ulong>(ref a, ref b, ref c, ref d);
        Assert.InRange(u, 0.0, 1.0 - Math.Pow(2, -52));
        var random = RandomStream.FromSeed(3);
        Span<ulong> w = stackalloc ulong[4];
        random.GetState(w);
        (a, b, c, d) = (w[0], w[1], w[2], w[3]);
        double sum = 0;
        for (int i = 0; i < 100_000; i++)
        {
            double x = LaneMath.NextUnit<Lanes1, double, ulong>(ref a, ref b, ref c, ref d);
            Assert.InRange(x, 0.0, 1.0 - Math.Pow(2, -52));
            sum += x;
        }
        Assert.InRange(sum / 100_000, 0.5 - 4 * Math.Sqrt(1.0 / 12 / 100_000), 0.5 + 4 * Math.Sqrt(1.0 / 12 / 100_000));
    }

    [Fact]
    public void LennardJonesLaneEnergyEqualsTheScalarEnergyExactly()
    {
        for (double r = 2.5; r < 9; r += 0.0137)
        {
            Assert.Equal(Lj.Energy(r), Lj.LaneEnergy<Lanes1, double, ulong>(r));
            Assert.Equal(Lj.Energy(r), Lj.LaneEnergy<Lanes8, Vector512<double>, Vector512<ulong>>(Vector512.Create(r)).GetElement(5));
        }
    }

    [Fact]
    public void ExponentialLaneEnergiesAreWithin1e15OfTheScalarEnergies()
    {
        var bond = new HarmonicBond(3.0, Length.FromAngstroms(1.2));
        for (double r = 1.0; r < 6; r += 0.0113)
        {
            Assert.Equal(bond.Energy(r), bond.LaneEnergy<Lanes1, double, ulong>(r));
            double morse = Iron.Energy(r);
            // The Morse energy is a difference that passes through 0; compare against the scale of its terms.
            Assert.True(Math.Abs(Iron.LaneEnergy<Lanes1, double, ulong>(r) - morse) <= 4e-15 * (Math.Abs(morse) + Iron.WellDepthInElectronVolts * 3), $"Morse at {r}");
        }
        for (double r = 1.0; r < 3; r += 0.0071)
        {
            double buck = OxygenOxygen.Energy(r);
            double scale = 22764.0 * Math.Exp(-r / 0.149) + 27.88 / Math.Pow(r, 6);
            Assert.True(Math.Abs(OxygenOxygen.LaneEnergy<Lanes1, double, ulong>(r) - buck) <= 4e-15 * scale, $"Buckingham at {r}");
        }
    }

    private static PairVibrationReport RunPair<T>(PairLandscape<T> landscape, Mass mass, double kelvin, int? lanes, int threads, int chains = 6,
        long samples = 20_000, int retained = 0)
        where T : struct, IPairPotential
        => PairSampler.Run(landscape, mass, Temperature.FromKelvin(kelvin), new SamplingSettings
        {
            Seed = 2026, Chains = chains, SamplesPerChain = samples, BurnIn = 2000, ChainsPerVector = lanes, MaxThreads = threads,
            RetainedDrawsPerChain = retained, MaxDiagnosticValuesPerChain = 4096,
        });

    private static void AssertIdentical(PairVibrationReport a, PairVibrationReport b)
    {
        Assert.Equal(a.Mean.Value, b.Mean.Value);
        Assert.Equal(a.Variance.Value, b.Variance.Value);
        Assert.Equal(a.Skewness, b.Skewness);
        Assert.Equal(a.ExcessKurtosis, b.ExcessKurtosis);
        Assert.Equal(a.Mean.StandardError, b.Mean.StandardError);
        Assert.Equal(a.Diagnostics.AcceptanceRate, b.Diagnostics.AcceptanceRate);
        Assert.Equal(a.Diagnostics.FinalStepWidthInAngstroms, b.Diagnostics.FinalStepWidthInAngstroms);
        Assert.Equal(a.Diagnostics.RHat, b.Diagnostics.RHat);
        Assert.Equal(a.Histogram.Density.ToArray(), b.Histogram.Density.ToArray());
        Assert.Equal(a.Histogram.Count, b.Histogram.Count);
        Assert.Equal(a.Draws.Chains.Length, b.Draws.Chains.Length);
        for (int c = 0; c < a.Draws.Chains.Length; c++)
        {
            Assert.Equal(a.Draws.Chains[c].ToArray(), b.Draws.Chains[c].ToArray());
        }
    }

    [Theory]
    [InlineData("lj-line")]
    [InlineData("morse-radial")]
    [InlineData("buckingham-radial")]
    [InlineData("function-line")]
    public void EveryLaneWidthAndThreadCountGivesTheSameBits(string which)
    {
        Func<int?, int, PairVibrationReport> run = which switch
        {
            "lj-line" => (l, t) => RunPair(PairLandscape.Line(Lj, Length.FromAngstroms(3.2), Length.FromAngstroms(6.0)), ArgonMass, 60, l, t, retained: 300),
            "morse-radial" => (l, t) => RunPair(PairLandscape.Radial(Iron, Length.FromAngstroms(2.0), Length.FromAngstroms(5.0)), IronMass, 900, l, t),
            "buckingham-radial" => (l, t) => RunPair(PairLandscape.Radial(OxygenOxygen, Length.FromAngstroms(1.0), Length.FromAngstroms(2.0)), Mass.FromAtomicMassUnits(16), 300, l, t),
            _ => (l, t) => RunPair(PairLandscape.Line(new FunctionPotential(r => 0.5 * 2.0 * (r - 1.5) * (r - 1.5), Length.FromAngstroms(0.1), Length.FromAngstroms(10), description: "invented quadratic"),
                Length.FromAngstroms(1.0), Length.FromAngstroms(2.0)), Mass.FromAtomicMassUnits(12), 200, l, t),
        };
        var reference = run(1, 1);
        foreach (var (lanes, threads) in new (int?, int)[] { (2, 1), (4, 1), (8, 1), (8, 2), (4, 2), (null, 2), (null, 1) })
        {
            AssertIdentical(reference, run(lanes, threads));
        }
    }

    [Fact]
    public void ChainCountsThatDoNotFillAVectorStillAgree()
    {
        var landscape = PairLandscape.Line(Lj, Length.FromAngstroms(3.2), Length.FromAngstroms(6.0));
        foreach (int chains in new[] { 1, 3, 9 })
        {
            AssertIdentical(RunPair(landscape, ArgonMass, 40, 1, 1, chains, 5000), RunPair(landscape, ArgonMass, 40, 8, 2, chains, 5000));
        }
    }

    /// <summary>Reference: the exact classical moments by quadrature (ExactPairDistribution, MathNet Gauss–Legendre); 4 standard errors.</summary>
    [Theory]
    [InlineData("lj-line", 40)]
    [InlineData("lj-radial", 120)]
    [InlineData("morse-radial", 1500)]
    [InlineData("buckingham-line", 600)]
    [InlineData("harmonic-radial", 300)]
    public void VectorChainsReproduceTheExactMoments(string which, double kelvin)
    {
        var report = which switch
        {
            "lj-line" => RunPair(PairLandscape.Line(Lj, Length.FromAngstroms(3.2), Length.FromAngstroms(6.0)), ArgonMass, kelvin, 8, 2, 8, 60_000),
            "lj-radial" => RunPair(PairLandscape.Radial(Lj, Length.FromAngstroms(3.2), Length.FromAngstroms(7.0)), ArgonMass, kelvin, 8, 2, 8, 60_000),
            "morse-radial" => RunPair(PairLandscape.Radial(Iron, Length.FromAngstroms(2.0), Length.FromAngstroms(5.0)), IronMass, kelvin, 4, 2, 8, 60_000),
            "buckingham-line" => RunPair(PairLandscape.Line(OxygenOxygen, Length.FromAngstroms(1.0), Length.FromAngstroms(2.0)), Mass.FromAtomicMassUnits(16), kelvin, 8, 1, 8, 60_000),
            _ => RunPair(PairLandscape.Radial(new HarmonicBond(2.0, Length.FromAngstroms(1.5)), Length.FromAngstroms(0.5), Length.FromAngstroms(2.5)), Mass.FromAtomicMassUnits(12), kelvin, 2, 2, 8, 60_000),
        };
        Assert.InRange(report.Exact.ZScoreMean, -4, 4);
        Assert.InRange(report.Exact.ZScoreVariance, -4, 4);
        Assert.InRange(report.Diagnostics.AcceptanceRate!.Value, 0.25, 0.65);
    }

    /// <summary>A quadratic well that returns −∞ or NaN in a narrow band: reaches the kernel's own fault check directly (the public entry points refuse it earlier, in quadrature).</summary>
    private readonly struct FaultyBand(double bad) : IPairPotential
    {
        public double Energy(double r) => r > 1.55 && r < 1.56 ? bad : (r - 1.5) * (r - 1.5);

        public double EnergyAtSquaredDistance(double squaredDistance) => Energy(Math.Sqrt(squaredDistance));

        public PairDerivatives Derivatives(double r) => new(Energy(r), 2 * (r - 1.5), 2, 0, 0);

        public double DomainLower => 0;

        public double DomainUpper => double.PositiveInfinity;

        public PotentialWell? Well => new(1.5, 0, double.PositiveInfinity);

        public string Description => "invented faulty band";

        public TD LaneEnergy<TOps, TD, TB>(TD r) where TOps : struct, ILaneOps<TD, TB> where TD : struct where TB : struct
            => LaneForms.ByLane<TOps, TD, TB, FaultyBand>(this, r);

        public TD LaneEnergyAtSquaredDistance<TOps, TD, TB>(TD squaredDistance) where TOps : struct, ILaneOps<TD, TB> where TD : struct where TB : struct
            => LaneForms.ByLaneAtSquaredDistance<TOps, TD, TB, FaultyBand>(this, squaredDistance);
    }

    /// <summary>
    /// β per lane: chains at two temperatures sharing one register (alternate lanes) draw, chain by chain, exactly the
    /// bits of the same chains run with every lane at that chain's temperature. Invented harmonic bond, k = 2 eV/Å².
    /// </summary>
    [Theory]
    [InlineData(8)]
    [InlineData(4)]
    public void ChainsAtDifferentTemperaturesInOneRegisterDrawWhatTheyDrawAlone(int lanes)
    {
        const long samples = 6000;
        double cold = 1 / Temperature.FromKelvin(100).ThermalEnergyInElectronVolts, hot = 1 / Temperature.FromKelvin(400).ThermalEnergyInElectronVolts;
        var bond = new HarmonicBond(2.0, Length.FromAngstroms(1.5));
        PairLaneChains.Plan<HarmonicBond> Plan(double beta, double[]? betas)
            => new(bond, 1.0, 2.0, beta, false, 0.05, 0.44, 0.5, 1000, samples, 17, betas);
        double[] DrawsOf(PairLaneChains.Plan<HarmonicBond> plan, int chain)
        {
            var outcomes = PairLaneChains.Build(lanes, plan, 0, lanes, c => 1.45 + 0.01 * c,
                c => new ChainRecord(new RecordLayout(1, samples, 1024, (int)samples, [1.5], 0, 1.0, 2.0, 20, [], null), c, 1.0 / 1024),
                c => new ProgressReporter(null, c, 1000 + samples, 300), GroupCheckpoints.None, 0, default).Run();
            return outcomes[chain].KeptSeparations.ToImmutable().ToArray();
        }
        var ladder = Enumerable.Range(0, lanes).Select(c => c % 2 == 0 ? cold : hot).ToArray();
        var mixed = Plan(cold, ladder);
        for (int chain = 0; chain < lanes; chain++)
        {
            var alone = Plan(ladder[chain], null);
            Assert.Equal(DrawsOf(alone, chain), DrawsOf(mixed, chain));
        }
        // And the temperatures really differ: the hot chains spread about twice as wide.
        double Spread(int chain) { var d = DrawsOf(mixed, chain); double m = d.Average(); return Math.Sqrt(d.Average(x => (x - m) * (x - m))); }
        Assert.InRange(Spread(1) / Spread(0), 1.6, 2.5);
    }

    [Theory]
    [InlineData(double.NaN, 8)]
    [InlineData(double.NegativeInfinity, 8)]
    [InlineData(double.NaN, 1)]
    [InlineData(double.NegativeInfinity, 4)]
    public void ANonFiniteEnergyStopsTheLaneKernelWithTheSeparation(double bad, int lanes)
    {
        var plan = new PairLaneChains.Plan<FaultyBand>(new FaultyBand(bad), 1.0, 2.0, 40.0, false, 0.3, 0.44, 1.0, 1000, 100_000, 5);
        var ex = Assert.Throws<NonFiniteEnergyException>(() => PairLaneChains.Build(lanes, plan, 0, lanes, c => 1.2 + 0.05 * c,
            c => new ChainRecord(new RecordLayout(1, 100_000, 1024, 0, [1.5], 0, 1.0, 2.0, 20, [], null), c, 1.0 / 1024),
            c => new ProgressReporter(null, c, 101_000, 300), GroupCheckpoints.None, 0, default).Run());
        Assert.InRange(ex.Separation, 1.55, 1.56);
        Assert.Contains("invented faulty band", ex.Message, StringComparison.Ordinal);
    }

    // Site A, and the centre of a 0.25 Å sphere 1.5 Å from it (FaultyBand's minimum); site B 2.5 Å from the centre, whose
    // pair energy stays finite. A pair separation in (1.55, 1.56) Å can only be the particle's distance to A.
    private static readonly Position FaultySiteA = new(0.7, -0.2, 0.4), FaultyCentre = new(2.2, -0.2, 0.4);

    private static SiteLaneChains.Plan<FaultyBand> FaultySitePlan(double bad, long burnIn)
        => new(new FaultyBand(bad), [FaultySiteA.X, FaultySiteA.Y, FaultySiteA.Z, FaultyCentre.X, FaultyCentre.Y + 2.5, FaultyCentre.Z],
            FaultyCentre, Confinement.Sphere(Length.FromAngstroms(0.25)), FaultyCentre, 0.1, 0, 0.1, 0, 0, 0.1, 40.0, 0.5, 0.44, 1.0, 0.02,
            burnIn, 100_000, 5, "invented faulty band",
            new BasinGrid(FaultyCentre.X - 0.25, FaultyCentre.Y - 0.25, FaultyCentre.Z - 0.25, 0.5, 2, new byte[8], AnyOutside: false)); // one basin: every point inside

    private static ChainRecord[] RunFaultySites(SiteLaneChains.Plan<FaultyBand> plan, int lanes, Func<int, Position> start)
        => SiteLaneChains.Build(lanes, plan, 0, lanes, c => (RandomStream.ForChain(plan.Seed, c), start(c)),
            c => new ChainRecord(new RecordLayout(3, plan.Samples, 1024, 0, [FaultyCentre.X, FaultyCentre.Y, FaultyCentre.Z], 0, 0, 0.25, 20, [], new ShapeFrame(FaultyCentre, [new(1, 0, 0), new(0, 1, 0), new(0, 0, 1)], [0.25, 0.25, 0.25], 0.25, 20, ShapeFrame.SideFor(20))), c, 1.0 / 1024),
            c => new ProgressReporter(null, c, plan.BurnIn + plan.Samples, 300), GroupCheckpoints.None, 0, default).Run();

    /// <summary>
    /// The site lane kernel notes a fault without its position and finds it again by replaying the chunk; the error must
    /// name the separation of the pair that failed (in the band), not the current position's distance from anything.
    /// </summary>
    [Theory]
    [InlineData(double.NaN, 8, 1000)]
    [InlineData(double.NegativeInfinity, 4, 1000)]
    [InlineData(double.NaN, 1, 0)]
    [InlineData(double.NegativeInfinity, 2, 0)]
    [InlineData(double.NaN, 2, 1000)]
    public void ANonFiniteEnergyStopsTheSiteLaneKernelWithThePairSeparation(double bad, int lanes, long burnIn)
    {
        var plan = FaultySitePlan(bad, burnIn);
        var ex = Assert.Throws<NonFiniteEnergyException>(() => RunFaultySites(plan, lanes, c => FaultyCentre + new Position(0, 0.01 * c, 0)));
        Assert.InRange(ex.Separation, 1.55, 1.56);
        Assert.Equal(bad, ex.ReturnedEnergy);
        Assert.Contains("invented faulty band", ex.Message, StringComparison.Ordinal);
        Assert.Contains(" at r = ", ex.Message, StringComparison.Ordinal);
    }

    [Theory]
    [InlineData(double.NaN, 4)]
    [InlineData(double.NegativeInfinity, 1)]
    public void AFaultyStartNamesTheSeparationOfItsPair(double bad, int lanes)
    {
        // The last chain starts 1.555 Å from A, inside the band (and 0.055 Å from the centre, inside the sphere).
        var faulty = FaultySiteA + new Position(1.555, 0, 0);
        var ex = Assert.Throws<NonFiniteEnergyException>(() => RunFaultySites(FaultySitePlan(bad, 1000), lanes, c => c == lanes - 1 ? faulty : FaultyCentre));
        var d = faulty - FaultySiteA;
        Assert.Equal(Math.Sqrt(d.X * d.X + d.Y * d.Y + d.Z * d.Z), ex.Separation);
    }

    [Theory]
    [InlineData(0)]
    [InlineData(3)]
    [InlineData(16)]
    public void ChainsPerVectorOutsideItsValuesIsRefusedByName(int value)
    {
        var settings = new SamplingSettings { Seed = 1, ChainsPerVector = value };
        var ex = Assert.Throws<ArgumentException>(settings.Validate);
        Assert.Contains("ChainsPerVector", ex.Message, StringComparison.Ordinal);
        Assert.Contains("1, 2, 4 or 8", ex.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void LaneChoiceFollowsHardwareAndThreads()
    {
        Assert.Equal(4, LaneGroups.ChooseLanes(16, 2, 4));
        Assert.Equal(1, LaneGroups.ChooseLanes(1, 2, null));
        int hardware = Vector512.IsHardwareAccelerated ? 8 : Vector256.IsHardwareAccelerated ? 4 : Vector128.IsHardwareAccelerated ? 2 : 1;
        Assert.Equal(hardware, LaneGroups.ChooseLanes(64, 2, null));
        Assert.Equal(Math.Min(hardware, 2), LaneGroups.ChooseLanes(4, 2, null));
    }

    private static SiteVibrationReport RunSite(SiteLandscape<LennardJones> landscape, double kelvin, int? lanes, int threads, int chains = 5,
        long samples = 8_000, SamplingMethod method = SamplingMethod.Metropolis)
        => SiteSampler.Run(landscape, ArgonMass, Temperature.FromKelvin(kelvin), new SamplingSettings
        {
            Seed = 77, Chains = chains, SamplesPerChain = samples, BurnIn = 2000, ChainsPerVector = lanes, MaxThreads = threads,
            RetainedDrawsPerChain = 100, MaxDiagnosticValuesPerChain = 2048, Method = method,
        });

    private static SiteLandscape<LennardJones> Cage(int shells, Confinement confinement)
        => SiteLandscape.Create(Lj, LatticeSites.NeighbourCage(LatticeKind.FaceCentredCubic, Length.FromAngstroms(3.8), shells), Position.Origin, confinement);

    [Theory]
    [InlineData(1, "sphere")]
    [InlineData(2, "box")]
    public void SiteChainsGiveTheSameBitsAtEveryWidthAndThreadCount(int shells, string shape)
    {
        var landscape = Cage(shells, shape == "sphere" ? Confinement.Sphere(Length.FromAngstroms(1.2)) : Confinement.Box(Length.FromAngstroms(0.9)));
        var reference = RunSite(landscape, 60, 1, 1);
        foreach (var (lanes, threads) in new (int?, int)[] { (2, 1), (4, 2), (8, 1), (8, 2), (null, 2) })
        {
            var other = RunSite(landscape, 60, lanes, threads);
            Assert.Equal(reference.Mean, other.Mean);
            Assert.Equal(reference.Covariance, other.Covariance);
            Assert.Equal(reference.MeanSquareDisplacement, other.MeanSquareDisplacement);
            Assert.Equal(reference.Diagnostics, other.Diagnostics);
            Assert.Equal(reference.RadialHistogram.Density.ToArray(), other.RadialHistogram.Density.ToArray());
            Assert.Equal(reference.Draws.Chains.SelectMany(c => c).ToArray(), other.Draws.Chains.SelectMany(c => c).ToArray());
        }
    }

    /// <summary>Reference: the library's direct (rejection) sampler, an independent algorithm; 4 combined standard errors per diagonal element.</summary>
    [Theory]
    [InlineData(1)]
    [InlineData(4)]
    public void VectorSiteChainsAgreeWithDirectSampling(int shells)
    {
        var landscape = Cage(shells, Confinement.Sphere(Length.FromAngstroms(1.2)));
        var metropolis = RunSite(landscape, 80, null, 2, 16, 40_000);
        var direct = RunSite(landscape, 80, null, 2, 4, 40_000, SamplingMethod.Direct);
        double combined = Math.Sqrt(Math.Pow(metropolis.MeanSquareDisplacement.StandardError, 2) + Math.Pow(direct.MeanSquareDisplacement.StandardError, 2));
        Assert.InRange(metropolis.MeanSquareDisplacement.Value - direct.MeanSquareDisplacement.Value, -4 * combined, 4 * combined);
        Assert.InRange(metropolis.Diagnostics.AcceptanceRate!.Value, 0.2, 0.45);
        Assert.InRange(metropolis.Diagnostics.RHat!.Value, 0.99, 1.01);
    }
}
