using System;
using System.IO;
using System.Linq;
using ThermalSampling.Landscapes;
using ThermalSampling.Persistence;
using ThermalSampling.Potentials;
using ThermalSampling.Randomness;
using ThermalSampling.Sampling;
using ThermalSampling.Statistics;
using ThermalSampling.Units;
using Xunit;

namespace ThermalSampling.Tests;

/// <summary>
/// The chains' records: what they hold (energy moments and histogram, stream position), and how merging, files and
/// summarising refuse what does not belong together. That parts merge to the one-process bits is checked for every walk
/// in <see cref="WalkConformanceTests"/>.
/// </summary>
public class RecordTests
{
    // Invented: a harmonic bond k = 2 eV/Å² at 1.5 Å on a ±0.5 Å line window, and an invented Lennard-Jones cage.
    private static readonly PairLandscape<HarmonicBond> Bond = PairLandscape.Line(new HarmonicBond(2.0, Length.FromAngstroms(1.5)),
        Length.FromAngstroms(1.0), Length.FromAngstroms(2.0));
    private static readonly SiteLandscape<LennardJones> Cage = InventedLandscapes.Cage;
    private static readonly Temperature T = Temperature.FromKelvin(300);
    private static readonly SamplingSettings Settings = new() { Seed = 31, Chains = 4, SamplesPerChain = 20_000, BurnIn = 2000, MaxDiagnosticValuesPerChain = 1000 };

    [Fact]
    public void ARecordSummarisesToTheReportOfTheRun()
    {
        var record = PairSampler.Sample(Bond, T, Settings);
        Assert.True(record.IsComplete);
        Assert.Equal(CheckpointTests.Bits(PairSampler.Run(Bond, Mass.FromAtomicMassUnits(12), T, Settings)),
            CheckpointTests.Bits(PairSampler.Summarise(Bond, Mass.FromAtomicMassUnits(12), record)));
        var sites = SiteSampler.Sample(Cage, Temperature.FromKelvin(20), Settings);
        Assert.Equal(CheckpointTests.Bits(SiteSampler.Run(Cage, Mass.FromAtomicMassUnits(12), Temperature.FromKelvin(20), Settings)),
            CheckpointTests.Bits(SiteSampler.Summarise(Cage, Mass.FromAtomicMassUnits(12), sites)));
    }

    /// <summary>
    /// A harmonic bond in 1D has ⟨V − V_min⟩ = kT/2 and Var(V) = (kT)²/2 (equipartition; the window's walls cut less than
    /// 1e-40 of the Gaussian at 300 K): the energy's mean and variance every chain records must agree within their
    /// sampling error, and the energy histogram must count every draw in bins of width 2^⌊log₂(kT/8)⌋. Also for direct draws.
    /// </summary>
    [Fact]
    public void EveryChainRecordsItsPotentialEnergy()
    {
        double kT = T.ThermalEnergyInElectronVolts;
        var chains = PairSampler.Sample(Bond, T, Settings).Chains.AddRange(PairSampler.Sample(Bond, T, Settings with { Method = SamplingMethod.Direct }).Chains);
        foreach (var chain in chains)
        {
            Assert.Equal(0, chain.EnergyReferenceInElectronVolts, 12); // the bond's minimum energy
            Assert.Equal(Settings.SamplesPerChain, chain.Draws);
            Assert.InRange(chain.PotentialEnergyMeanInElectronVolts / (kT / 2), 0.9, 1.1);
            Assert.InRange(chain.PotentialEnergyVarianceInElectronVoltsSquared / (kT * kT / 2), 0.8, 1.2);
            var h = chain.EnergyHistogram;
            Assert.Equal(chain.Draws, h.Total);
            Assert.Equal(0, h.Below);
            Assert.True(h.BinWidthInElectronVolts <= kT / 8 && h.BinWidthInElectronVolts > kT / 16);
            Assert.Equal(Math.ScaleB(1.0, Math.ILogB(h.BinWidthInElectronVolts)), h.BinWidthInElectronVolts);
            double histogramMean = h.Counts.Select((n, i) => n * (i + 0.5) * h.BinWidthInElectronVolts).Sum() / h.Total;
            Assert.InRange(histogramMean - chain.PotentialEnergyMeanInElectronVolts, -h.BinWidthInElectronVolts, h.BinWidthInElectronVolts);
        }
    }

    /// <summary>A Metropolis pair step draws two uniforms: after B + N steps a chain's stream stands 2(B + N) outputs past its start.</summary>
    [Fact]
    public void ARecordSaysWhereItsChainsStreamStands()
    {
        var record = PairSampler.Sample(Bond, T, Settings);
        foreach (var chain in record.Chains)
        {
            var stream = RandomStream.ForChain(Settings.Seed, chain.Chain);
            for (long i = 0; i < 2 * (Settings.BurnIn + Settings.SamplesPerChain); i++)
            {
                stream.NextUInt64();
            }
            var expected = new ulong[4];
            stream.GetState(expected);
            Assert.Equal(expected, chain.StreamState.ToArray());
            Assert.InRange(chain.Accepted, 1, chain.Proposals);
            Assert.Equal(Settings.SamplesPerChain, chain.Proposals);
        }
    }

    [Fact]
    public void MergingRefusesPartsOfDifferentRunsOrOverlappingChains()
    {
        var first = PairSampler.Sample(Bond, T, Settings, new ChainRange(0, 2));
        var rest = PairSampler.Sample(Bond, T, Settings, new ChainRange(2, 2));
        Assert.Contains("Seed 32 where parts[0] has 31", Assert.Throws<ArgumentException>(() =>
            TemperatureRecord.Merge([first, PairSampler.Sample(Bond, T, Settings with { Seed = 32 }, new ChainRange(2, 2))])).Message);
        Assert.Contains("temperature 301 K", Assert.Throws<ArgumentException>(() =>
            TemperatureRecord.Merge([first, PairSampler.Sample(Bond, Temperature.FromKelvin(301), Settings, new ChainRange(2, 2))])).Message);
        Assert.Contains("Chain 1 is in more than one part", Assert.Throws<ArgumentException>(() =>
            TemperatureRecord.Merge([first, PairSampler.Sample(Bond, T, Settings, new ChainRange(1, 3))])).Message);
    }

    [Fact]
    public void AGapBetweenPartsIsRefusedNamingTheMissingChains()
    {
        var ex = Assert.Throws<ArgumentException>(() =>
            TemperatureRecord.Merge([PairSampler.Sample(Bond, T, Settings, new ChainRange(0, 1)), PairSampler.Sample(Bond, T, Settings, new ChainRange(3, 1))]));
        Assert.Contains("leave out chains 1 to 2", ex.Message);
    }

    [Fact]
    public void SummarisingRefusesAnIncompleteRecordOrAnotherLandscape()
    {
        var part = PairSampler.Sample(Bond, T, Settings, new ChainRange(0, 2));
        Assert.False(part.IsComplete);
        Assert.Contains("merge the parts", Assert.Throws<ArgumentException>(() => PairSampler.Summarise(Bond, Mass.FromAtomicMassUnits(12), part)).Message);
        var other = PairLandscape.Line(new HarmonicBond(2.5, Length.FromAngstroms(1.5)), Length.FromAngstroms(1.0), Length.FromAngstroms(2.0));
        Assert.Contains("summarise it with the landscape it came from",
            Assert.Throws<ArgumentException>(() => PairSampler.Summarise(other, Mass.FromAtomicMassUnits(12), PairSampler.Sample(Bond, T, Settings))).Message);
        Assert.Throws<ArgumentOutOfRangeException>(() => PairSampler.Sample(Bond, T, Settings, new ChainRange(3, 2)));
    }

    [Fact]
    public void ADamagedRecordFileIsRefused()
    {
        var bytes = new MemoryStream();
        PairSampler.Sample(Bond, T, Settings with { SamplesPerChain = 100 }).WriteTo(bytes);
        var data = bytes.ToArray();
        data[^40] ^= 1;
        Assert.Contains("fails its SHA-256 checksum", Assert.Throws<CheckpointException>(() => TemperatureRecord.ReadFrom(new MemoryStream(data))).Message);
        Assert.Contains("cut short", Assert.Throws<CheckpointException>(() => TemperatureRecord.ReadFrom(new MemoryStream(bytes.ToArray()[..^10]))).Message);
        Assert.Contains("not a record file", Assert.Throws<CheckpointException>(() => TemperatureRecord.ReadFrom(new MemoryStream("{\"format\":\"x\"}\n"u8.ToArray()))).Message);
    }
}
