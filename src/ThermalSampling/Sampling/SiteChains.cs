using System;
using System.Collections.Generic;
using System.Globalization;
using System.Linq;
using System.Threading;
using MathNet.Numerics.LinearAlgebra;
using ThermalSampling.Analysis;
using ThermalSampling.Landscapes;
using ThermalSampling.Persistence;
using ThermalSampling.Potentials;
using ThermalSampling.Randomness;
using ThermalSampling.Statistics;
using ThermalSampling.Units;

namespace ThermalSampling.Sampling;

/// <summary>
/// The site sampling step: runs the chains of one temperature (Metropolis walks on the lane engine with a proposal shaped
/// like the harmonic covariance, or direct draws from a Gaussian envelope) and returns their records. Builds no report.
/// </summary>
internal static class SiteChains
{
    private const double EnvelopeInflation = 1.3;

    /// <summary>Runs the chains of <paramref name="range"/> at one temperature about the harmonic estimate <paramref name="harmonic"/> (<see cref="Plan"/>'s arguments).</summary>
    internal static TemperatureRecord Sample<TPotential>(SiteLandscape<TPotential> landscape, SiteHarmonicEstimate harmonic, double targetAcceptance,
        Temperature temperature, SamplingSettings settings, IProgress<SamplingProgress>? progress, CancellationToken cancellationToken,
        CheckpointSession? session, int temperatureIndex, ChainRange range, RingPlan? ring = null)
        where TPotential : struct, IPairPotential
        => Plan(landscape, harmonic, targetAcceptance, temperature, settings, progress, ring).Run(range, session, temperatureIndex, cancellationToken);

    /// <summary>Plans every chain of <paramref name="settings"/> at one temperature about the harmonic estimate <paramref name="harmonic"/>;
    /// chain c draws from stream <paramref name="streamOffset"/> + c of the seed.</summary>
    internal static TemperaturePlan Plan<TPotential>(SiteLandscape<TPotential> landscape, SiteHarmonicEstimate harmonic, double targetAcceptance,
        Temperature temperature, SamplingSettings settings, IProgress<SamplingProgress>? progress, RingPlan? ring = null, int streamOffset = 0)
        where TPotential : struct, IPairPotential
    {
        double target = targetAcceptance;
        var min = harmonic.Minimum;
        double beta = 1 / temperature.ThermalEnergyInElectronVolts;
        var cholesky = harmonic.ClassicalCovariance.ToMatrix().Cholesky().Factor;
        var shape = (cholesky[0, 0], cholesky[1, 0], cholesky[1, 1], cholesky[2, 0], cholesky[2, 1], cholesky[2, 2]);
        var kernel = new SiteWeight<TPotential>(landscape, beta);
        double logWeightMin = kernel.LogWeight(min.X, min.Y, min.Z);
        bool metropolis = settings.Method == SamplingMethod.Metropolis;
        double sigmaMin = Math.Sqrt(harmonic.Modes.Min(m => m.ClassicalVarianceInAngstromsSquared));
        double size = landscape.Confinement.SizeInAngstroms;
        double maxScale = 2 * size / sigmaMin;
        double scale0 = settings.InitialStepWidthInAngstroms is double w ? w / sigmaMin : 2.38 / Math.Sqrt(3);
        double centreOffset = (min - landscape.Centre).Norm;
        double radialMax = (landscape.Confinement.Shape == ConfinementShape.Sphere ? size : size * Math.Sqrt(3)) + centreOffset;

        var basin = SiteBasins.MapWithGrid(landscape, min).Grid;
        double wallBand = WallBand(cholesky);
        Envelope? envelope = metropolis ? null : Envelope.Build(kernel, min, cholesky, logWeightMin, landscape, settings.Seed);
        var layout = new RecordLayout(3, settings.SamplesPerChain, settings.MaxDiagnosticValuesPerChain, settings.RetainedDrawsPerChain, [min.X, min.Y, min.Z],
            harmonic.MinimumEnergyInElectronVolts, 0, radialMax, settings.HistogramBins, SiteWaves(settings),
            // A ring polymer's beads spread as the quantum harmonic modes say (wider than the classical ones at low temperature): its frame uses those.
            ShapeFrame.For(ring is null ? harmonic : harmonic with { Modes = [.. harmonic.Modes.Select(m => m with { ClassicalVarianceInAngstromsSquared = m.QuantumVarianceInAngstromsSquared })] },
                landscape.Confinement, landscape.Centre, settings.HistogramBins, settings.SiteDistributionHalfWidthInSigmas));
        double binWidth = EnergyHistogram.BinWidthFor(temperature.ThermalEnergyInElectronVolts);
        ChainRecord NewRecord(int c) => new(layout, c, binWidth);
        ProgressReporter NewReporter(int c) => new(progress, c, (metropolis ? settings.BurnIn : 0) + settings.SamplesPerChain, temperature.InKelvin);

        var (groupPotentials, groupEnds) = landscape.KernelGroups();
        SiteLaneChains.Plan<TPotential>? plan = metropolis ? new(landscape.Potential, landscape.PackedCoordinates.ToArray(), landscape.Centre, landscape.Confinement,
            min, shape.Item1, shape.Item2, shape.Item3, shape.Item4, shape.Item5, shape.Item6, beta, scale0, target, maxScale, wallBand,
            settings.BurnIn, settings.SamplesPerChain, settings.Seed, landscape.Potential.Description, basin, null,
            groupPotentials, groupEnds, landscape.Field) : null;
        (RandomStream, Position) Start(int c) => StartOfChain(landscape, min, cholesky, settings.Seed, streamOffset + c);
        return new TemperaturePlan(settings,
            metropolis ? (lanes, first, end, checkpoints, g, ct) => ring is null
                ? SiteLaneChains.Build(lanes, plan!, first, end, Start, NewRecord, NewReporter, checkpoints, g, ct)
                : SiteLaneChains.BuildRing(lanes, plan!, ring, settings.InitialStepWidthInAngstroms ?? 2.38 / Math.Sqrt(3) * sigmaMin, 2 * size, first, end,
                    Start, NewRecord, NewReporter, checkpoints, g, ct) : null,
            metropolis ? null : (c, checkpoints, ct) => new DirectChain<EnvelopeDraws<TPotential>>(new(kernel, landscape, envelope!, basin, wallBand), settings, c, NewRecord(c), NewReporter(c), "direct site chain")
                .Run(checkpoints, ct),
            results => new TemperatureRecord("sites", landscape.Description, Fingerprint(landscape), temperature, settings, target, sigmaMin, layout, [.. results],
                Internal.LibraryVersion.Current));
    }

    /// <summary>The site's scattering vectors: three components each, or an error naming the setting.</summary>
    internal static double[] SiteWaves(SamplingSettings settings)
    {
        var waves = SettingsFields.Waves(settings);
        if (waves.Length % 3 != 0)
        {
            throw new ArgumentException(string.Create(CultureInfo.InvariantCulture,
                $"ScatteringVectorsInInverseAngstroms has {waves.Length} values; a site needs three (q_x, q_y, q_z) per vector."), nameof(settings));
        }
        return [.. waves];
    }

    /// <summary>The exact sites, centre and confinement, and the energies on a 9×9×9 grid across the confinement, as one fingerprint.</summary>
    internal static string Fingerprint<TPotential>(SiteLandscape<TPotential> landscape) where TPotential : struct, IPairPotential
    {
        var values = new List<double> { (double)landscape.Confinement.Shape, landscape.Confinement.SizeInAngstroms, landscape.Centre.X, landscape.Centre.Y, landscape.Centre.Z };
        values.AddRange(landscape.PackedCoordinates.ToArray());
        double size = landscape.Confinement.SizeInAngstroms;
        for (int i = 0; i < 729; i++)
        {
            var p = landscape.Centre + new Position(size * (i % 9 - 4) / 4.5, size * (i / 9 % 9 - 4) / 4.5, size * (i / 81 - 4) / 4.5);
            values.Add(landscape.Energy(p));
        }
        return SweepIdentity.FingerprintOf(values);
    }

    /// <summary>Deterministic points on the confinement boundary (a Fibonacci sphere, projected onto the box for a box).</summary>
    internal static IEnumerable<Position> BoundaryPoints<TPotential>(SiteLandscape<TPotential> landscape, int count)
        where TPotential : struct, IPairPotential
    {
        double golden = Math.PI * (3 - Math.Sqrt(5));
        double size = landscape.Confinement.SizeInAngstroms;
        for (int i = 0; i < count; i++)
        {
            double z = 1 - 2 * (i + 0.5) / count;
            double r = Math.Sqrt(1 - z * z);
            var n = new Position(r * Math.Cos(golden * i), r * Math.Sin(golden * i), z);
            double scale = landscape.Confinement.Shape == ConfinementShape.Sphere
                ? size
                : size / Math.Max(Math.Abs(n.X), Math.Max(Math.Abs(n.Y), Math.Abs(n.Z)));
            yield return landscape.Centre + (scale * (1 - 1e-12)) * n;
        }
    }

    private static bool NearWall(Confinement confinement, Position centre, double x, double y, double z, double band)
        => confinement.DistanceToWall(x - centre.X, y - centre.Y, z - centre.Z) < band;

    /// <summary>Chain c's over-dispersed start, about two harmonic standard deviations out and inside the confinement, and its stream after the draws that chose it.</summary>
    private static (RandomStream Stream, Position Start) StartOfChain<TPotential>(SiteLandscape<TPotential> landscape, Position min, Matrix<double> cholesky,
        ulong seed, int chain)
        where TPotential : struct, IPairPotential
    {
        var random = RandomStream.ForChain(seed, chain);
        var start = min;
        for (int attempt = 0; attempt < 100; attempt++)
        {
            double a = 2 * random.NextStandardNormal(), b = 2 * random.NextStandardNormal(), c = 2 * random.NextStandardNormal();
            var p = min + new Position(cholesky[0, 0] * a, cholesky[1, 0] * a + cholesky[1, 1] * b, cholesky[2, 0] * a + cholesky[2, 1] * b + cholesky[2, 2] * c);
            if (landscape.Contains(p))
            {
                start = p;
                break;
            }
        }
        return (random, start);
    }

    /// <summary>The near-wall band: one harmonic RMS spread per direction, √(tr Σ/3).</summary>
    private static double WallBand(Matrix<double> cholesky) => Math.Sqrt(cholesky.Multiply(cholesky.Transpose()).Trace() / 3);

    /// <summary>Direct draws of a site's position by rejection from the Gaussian envelope, counting the envelope draws tried.</summary>
    /// <param name="kernel">The log Boltzmann weight.</param>
    /// <param name="landscape">The landscape (energies, confinement).</param>
    /// <param name="envelope">The Gaussian envelope and its bound.</param>
    /// <param name="basin">The site's basin map.</param>
    /// <param name="wallBand">The near-wall band (one harmonic RMS spread), Å: computed once, not per draw.</param>
    private readonly struct EnvelopeDraws<TPotential>(SiteWeight<TPotential> kernel, SiteLandscape<TPotential> landscape, Envelope envelope, BasinGrid basin,
        double wallBand) : IDirectSource
        where TPotential : struct, IPairPotential
    {
        public void Draw(ref RandomStream random, ChainRecord record)
        {
            while (true)
            {
                record.Proposals++;
                var (x, y, z, logQ) = envelope.Draw(ref random);
                double logP = kernel.LogWeight(x, y, z) - envelope.LogWeightAtMinimum;
                if (double.IsNegativeInfinity(logP))
                {
                    continue;
                }
                double logRatio = logP - logQ;
                if (logRatio > envelope.LogBound)
                {
                    throw new InvalidOperationException(string.Create(CultureInfo.InvariantCulture,
                        $"Direct sampling found a position where the Boltzmann weight exceeds its Gaussian envelope bound (log ratio {logRatio:G4} > {envelope.LogBound:G4}); the draws would be biased. Use Metropolis for this landscape."));
                }
                if (Math.Log(random.NextOpenUnitInterval()) < logRatio - envelope.LogBound)
                {
                    record.AddPosition(x, y, z, landscape.Energy(new Position(x, y, z)));
                    record.Accepted++;
                    if (NearWall(landscape.Confinement, landscape.Centre, x, y, z, wallBand))
                    {
                        record.DrawsNearWall++;
                    }
                    if (record.DrawsPerBasin.Length == 0)
                    {
                        record.DrawsPerBasin = new long[basin.LabelCount]; // sized now (a checkpoint names the labels), counted in Finish
                    }
                    if (basin.AnyOutside)
                    {
                        var reference = record.Layout.References;
                        record.AddBasinDraw(basin.LabelOf(x, y, z), basin.LabelCount, record.Draws - 1, x - reference[0], y - reference[1], z - reference[2]);
                    }
                    return;
                }
            }
        }

        /// <summary>The draws per basin, and outside the site's, from the per-basin sums.</summary>
        public void Finish(ChainRecord record) => record.CountBasinDraws(basin.LabelCount);
    }

    /// <summary>The Gaussian envelope N(min, 1.3²Σ) and its numerically established bound.</summary>
    private sealed class Envelope
    {
        private readonly Position _min;
        private readonly Matrix<double> _l; // inflated Cholesky factor

        private Envelope(Position min, Matrix<double> l, double logWeightAtMinimum, double logBound)
        {
            _min = min;
            _l = l;
            LogWeightAtMinimum = logWeightAtMinimum;
            LogBound = logBound;
        }

        internal double LogWeightAtMinimum { get; }

        internal double LogBound { get; }

        /// <summary>A draw and log q (up to the same constant for every draw): −½|ξ|².</summary>
        internal (double X, double Y, double Z, double LogQ) Draw(ref RandomStream random)
        {
            double a = random.NextStandardNormal(), b = random.NextStandardNormal(), c = random.NextStandardNormal();
            return (_min.X + _l[0, 0] * a, _min.Y + _l[1, 0] * a + _l[1, 1] * b, _min.Z + _l[2, 0] * a + _l[2, 1] * b + _l[2, 2] * c, -0.5 * (a * a + b * b + c * c));
        }

        private double LogQ(Position p)
        {
            var d = Vector<double>.Build.Dense(new[] { p.X - _min.X, p.Y - _min.Y, p.Z - _min.Z });
            var xi = _l.Solve(d);
            return -0.5 * xi.DotProduct(xi);
        }

        internal static Envelope Build<TPotential>(SiteWeight<TPotential> kernel, Position min, Matrix<double> cholesky, double logWeightMin,
            SiteLandscape<TPotential> landscape, ulong seed) where TPotential : struct, IPairPotential
        {
            var probe = new Envelope(min, EnvelopeInflation * cholesky, logWeightMin, 0);
            var random = RandomStream.FromSeed(RandomStream.SplitMix64(ref seed) ^ 0x5DEECE66DUL);
            double best = 0; // the ratio is 1 (log 0) at the minimum itself
            double sumAccept = 0;
            int inside = 0;
            const int probes = 20_000;
            var ratios = new double[probes];
            for (int i = 0; i < probes; i++)
            {
                var (x, y, z, logQ) = probe.Draw(ref random);
                double lp = kernel.LogWeight(x, y, z) - logWeightMin;
                ratios[i] = double.IsNegativeInfinity(lp) ? double.NegativeInfinity : lp - logQ;
                if (!double.IsNegativeInfinity(lp))
                {
                    inside++;
                    best = Math.Max(best, ratios[i]);
                }
            }
            double size = landscape.Confinement.SizeInAngstroms;
            var c = landscape.Centre;
            for (int i = 0; i < probes; i++)
            {
                var p = c + new Position(size * (2 * random.NextUnitInterval() - 1), size * (2 * random.NextUnitInterval() - 1), size * (2 * random.NextUnitInterval() - 1));
                if (landscape.Contains(p))
                {
                    best = Math.Max(best, kernel.LogWeight(p.X, p.Y, p.Z) - logWeightMin - probe.LogQ(p));
                }
            }
            foreach (var p in BoundaryPoints(landscape, 2000))
            {
                best = Math.Max(best, kernel.LogWeight(p.X, p.Y, p.Z) - logWeightMin - probe.LogQ(p));
            }
            double bound = best + 0.05 * (1 + Math.Abs(best));
            foreach (double r in ratios)
            {
                if (!double.IsNegativeInfinity(r))
                {
                    sumAccept += Math.Exp(r - bound);
                }
            }
            double acceptance = sumAccept / probes;
            // A NaN bound or acceptance would make the sampling loop spin forever: no draw could ever be accepted against it.
            if (!double.IsFinite(bound) || double.IsNaN(acceptance))
            {
                throw new InvalidOperationException(string.Create(CultureInfo.InvariantCulture,
                    $"Direct sampling could not bound the Boltzmann weight by its Gaussian envelope (log bound {bound:G4}, acceptance {acceptance:G4}): the landscape's energies are not finite numbers near the minimum. Use Metropolis, and check the potential."));
            }
            if (inside == 0 || acceptance < 1e-3)
            {
                throw new InvalidOperationException(string.Create(CultureInfo.InvariantCulture,
                    $"Direct sampling would accept only {acceptance:P3} of its Gaussian envelope draws (log bound {bound:G4}): the well is too far from harmonic inside this confinement. Use Metropolis."));
            }
            return new Envelope(min, EnvelopeInflation * cholesky, logWeightMin, bound);
        }
    }
}
