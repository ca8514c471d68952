using System;
using System.Runtime.CompilerServices;
using System.Runtime.InteropServices;
using System.Runtime.Intrinsics;
using System.Threading;
using ThermalSampling.Statistics;
using ThermalSampling.Persistence;
using ThermalSampling.Numerics;
using ThermalSampling.Analysis;
using ThermalSampling.Landscapes;
using ThermalSampling.Potentials;
using ThermalSampling.Randomness;

namespace ThermalSampling.Sampling;

// Stryker disable all : vector-lane kernel, in no mutation mode (eng/mutation-testing.sh); LaneKernelTests checks it bit for bit
/// <summary>
/// Random-walk Metropolis for a particle among fixed sites, several chains in lockstep (one per vector lane). Per step
/// and lane: p' = p + s·L·v with v uniform in (−1, 1)³ on a symmetric 32-bit grid (<see cref="LaneMath.NextOffsetPair{TOps, TD, TB}"/>) and L the Cholesky factor of the harmonic covariance (a
/// symmetric proposal shaped like the well); p' outside the confinement is rejected; otherwise accepted when
/// u₄ &lt; e^(−(V(p') − V(p))/kT). The scale s adapts per lane in burn-in by <see cref="LaneAdaptation"/>'s rule and then
/// freezes. Each chain uses its own stream, so its draws are the same bits at any lane width and thread count.
/// </summary>
internal static class SiteLaneChains
{
    private const int ChunkSteps = LaneAdaptation.ChunkSteps;
    private const int BlockSize = 4096;

    /// <summary>What one chain hands back.</summary>
    internal sealed record ChainOutcome(CovarianceAccumulator Moments, BatchMeansStore[] Stores, BinCounter Radial, DrawRecorder<Position> Draws,
        long Accepted, long NearWall, long OutsideBasin, double Scale);

    /// <summary>Everything fixed for a run.</summary>
    internal sealed record Plan<TPotential>(TPotential Potential, double[] Sites, Position Centre, Confinement Confinement, Position Minimum,
        double L00, double L10, double L11, double L20, double L21, double L22, double Beta, double InitialScale, double TargetAcceptance,
        double MaxScale, double WallBand, long BurnIn, long Samples, ulong Seed, string Description, BasinGrid Basin, double[]? ChainBetas = null)
        where TPotential : struct, IPairPotential
    {
        /// <summary>The inverse temperature of chain <paramref name="chain"/> (<see cref="ChainBetas"/> when the chains' temperatures differ), 1/eV.</summary>
        internal double BetaOf(int chain) => ChainBetas?[chain] ?? Beta;
    }

    /// <summary>Per chain: its stream advanced past the start-point draws, and the start.</summary>
    internal delegate (RandomStream Stream, Position Start) ChainStart(int chain);

    /// <summary>Per chain: its three batch-mean stores, radial histogram and retained draws.</summary>
    internal delegate (BatchMeansStore[] Stores, BinCounter Radial, DrawRecorder<Position> Draws) ChainRecord(int chain);

    internal static ChainOutcome[] Run<TPotential>(int lanes, Plan<TPotential> plan, int firstChain, int chains, ChainStart start, ChainRecord record,
        Func<int, ProgressReporter> progress, GroupCheckpoints checkpoints, int group, CancellationToken ct)
        where TPotential : struct, IPairPotential
        => LaneWidths.Dispatch<GroupJob<TPotential>, ChainOutcome[]>(lanes, new(plan, firstChain, chains, start, record, progress, checkpoints, group, ct));

    /// <summary>A site lane group at the width the dispatcher picks.</summary>
    private readonly record struct GroupJob<TPotential>(Plan<TPotential> Plan, int FirstChain, int Chains, ChainStart Start, ChainRecord Record,
        Func<int, ProgressReporter> Progress, GroupCheckpoints Checkpoints, int Group, CancellationToken Ct) : ILaneWidthJob<ChainOutcome[]>
        where TPotential : struct, IPairPotential
    {
        public ChainOutcome[] Run<TOps, TD, TB>()
            where TOps : struct, ILaneOps<TD, TB>
            where TD : struct
            where TB : struct
            => new Group<TOps, TD, TB, TPotential>(Plan, FirstChain, Chains, Start, Record, Progress).Run(Checkpoints, Group, Ct);
    }

    /// <summary>One lane group of site chains on the lane engine: the site walk's state, its kernels and its records.</summary>
    private sealed class Group<TOps, TD, TB, TPotential> : LaneEngine<TOps, TD, TB, SiteWalk<TD, TB>>
        where TOps : struct, ILaneOps<TD, TB>
        where TD : struct
        where TB : struct
        where TPotential : struct, IPairPotential
    {
        private readonly Plan<TPotential> _plan;
        private readonly (BatchMeansStore[] Stores, BinCounter Radial, DrawRecorder<Position> Draws)[] _records;
        private readonly CovarianceAccumulator[] _moments;
        private readonly Kernel<TOps, TD, TB, TPotential> _kernel;
        private readonly SiteTally _tally;
        private readonly ChainStart _start;
        private TD _x, _y, _z;

        internal Group(Plan<TPotential> plan, int firstChain, int chains, ChainStart start, ChainRecord makeRecord, Func<int, ProgressReporter> makeProgress)
            : base(new EngineSettings(plan.BurnIn, plan.Samples, plan.InitialScale, plan.MaxScale, BlockSize, "SLGH", "LOGS", "site chain group"),
                firstChain, chains, MakeReporters(firstChain, chains, makeProgress))
        {
            _plan = plan;
            _start = start;
            _records = new (BatchMeansStore[] Stores, BinCounter Radial, DrawRecorder<Position> Draws)[Live];
            for (int lane = 0; lane < Live; lane++)
            {
                _records[lane] = makeRecord(firstChain + lane);
            }
            _moments = new CovarianceAccumulator[Live];
            _kernel = new Kernel<TOps, TD, TB, TPotential>(plan);
            _tally = new SiteTally(_records[0].Radial, _records[0].Draws.Capacity, TOps.Count, Live, plan.Basin, _records[0].Stores[SiteChains.EnergyStore].Reference);
        }

        internal ChainOutcome[] Run(GroupCheckpoints checkpoints, int group, CancellationToken ct)
        {
            var scale = RunLanes(checkpoints, group, ct);
            var outcomes = new ChainOutcome[Live];
            for (int lane = 0; lane < Live; lane++)
            {
                outcomes[lane] = new ChainOutcome(_moments[lane], _records[lane].Stores, _records[lane].Radial, _records[lane].Draws,
                    (long)TOps.Get(State.Accepted, lane), (long)TOps.Get(State.NearWall, lane), _tally.OutsideBasin[lane], TOps.Get(scale, lane));
            }
            return outcomes;
        }

        private protected override void PlaceLane(int lane, int chain)
        {
            var (stream, p) = _start(chain);
            SeedLane(ref State.R0, ref State.R1, ref State.R2, ref State.R3, lane, stream);
            State.NegativeBeta = TOps.Set(State.NegativeBeta, lane, -_plan.BetaOf(chain)); // β per lane: one register may hold several temperatures
            _x = TOps.Set(_x, lane, p.X);
            _y = TOps.Set(_y, lane, p.Y);
            _z = TOps.Set(_z, lane, p.Z);
        }

        private protected override void Start() => _kernel.Start(ref State, _x, _y, _z);

        private protected override TD AdaptChunk(TD logWidth, double[] gains, int chunk) => _kernel.AdaptChunk(ref State, logWidth, gains, chunk);

        private protected override int RecordChunk(TD width, int chunk, long done, ref int inBatch, int batchSize)
            => _kernel.RecordChunk(ref State, width, chunk, done, ref inBatch, batchSize, _tally);

        private protected override void ClearFaults() => State.Faults = LaneFaultCheck.None<TOps, TD, TB>();

        private protected override bool ReplaysFaults => true;

        private protected override void ThrowIfFaulted(in SiteWalk<TD, TB> before, TD logWidthBefore, double[]? gains, TD width, int chunk)
        {
            if (!TOps.AllTrue(State.Faults.AllFinite))
            {
                _kernel.ThrowAtFirstFault(before, State.Faults, logWidthBefore, gains, width, chunk);
            }
        }

        private protected override void ResetForRecording()
        {
            State.Sums = default;
            State.Batch = default;
            State.Accepted = State.NearWall = TOps.Broadcast(0.0);
            Array.Clear(_tally.OutsideBasin);
        }

        private protected override int BatchSize => _records[0].Stores[0].BatchSize;

        private protected override void AddClosedBatches(int closed)
        {
            for (int k = 0; k < closed; k++)
            {
                for (int lane = 0; lane < _records.Length; lane++)
                {
                    for (int value = 0; value < 4; value++) // x, y, z, then the potential energy
                    {
                        _records[lane].Stores[value].AddBatchSums(_tally.BatchSums[(8 * k + 2 * value) * TOps.Count + lane], _tally.BatchSums[(8 * k + 2 * value + 1) * TOps.Count + lane]);
                    }
                }
            }
        }

        private protected override void CloseBlock(int count)
        {
            var minimum = _plan.Minimum;
            var s = State.Sums;
            for (int lane = 0; lane < _records.Length; lane++)
            {
                var block = CovarianceAccumulator.FromRawSums(count, minimum.X, minimum.Y, minimum.Z,
                    TOps.Get(s.X, lane), TOps.Get(s.Y, lane), TOps.Get(s.Z, lane), TOps.Get(s.XX, lane), TOps.Get(s.YY, lane), TOps.Get(s.ZZ, lane),
                    TOps.Get(s.XY, lane), TOps.Get(s.XZ, lane), TOps.Get(s.YZ, lane));
                _moments[lane] = CovarianceAccumulator.Merge(_moments[lane], block);
            }
            State.Sums = default;
        }

        private protected override void SaveRecords(StateWriter w)
        {
            for (int lane = 0; lane < Live; lane++)
            {
                _moments[lane].Save(w);
                foreach (var store in _records[lane].Stores)
                {
                    store.Save(w);
                }
                _records[lane].Radial.Save(w);
                _records[lane].Draws.Save(w, 3);
            }
            _tally.Save(w, RecordedSteps);
            w.Longs("OUTB", _tally.OutsideBasin);
        }

        private protected override void LoadRecords(StateReader r)
        {
            for (int lane = 0; lane < Live; lane++)
            {
                _moments[lane] = CovarianceAccumulator.Load(r);
                foreach (var store in _records[lane].Stores)
                {
                    store.Load(r);
                }
                _records[lane].Radial.Load(r);
                _records[lane].Draws.Load(r, 3);
            }
            _tally.Load(r, RecordedSteps);
            r.Longs("OUTB", _tally.OutsideBasin.Length).CopyTo(_tally.OutsideBasin, 0);
        }

        private protected override void Complete() => _tally.CopyTo(_records, _plan.Samples);
    }

    private readonly struct Kernel<TOps, TD, TB, TPotential>
        where TOps : struct, ILaneOps<TD, TB>
        where TD : struct
        where TB : struct
        where TPotential : struct, IPairPotential
    {
        private readonly Plan<TPotential> _plan;
        private readonly TPotential _potential;
        private readonly double[] _sites;
        private readonly bool _sphere;

        internal Kernel(Plan<TPotential> plan)
        {
            _plan = plan;
            _potential = plan.Potential;
            _sites = plan.Sites;
            _sphere = plan.Confinement.Shape == ConfinementShape.Sphere;
        }

        /// <summary>Σ_sites V(|p − site|²) in every lane, summed site by site in the landscape's order.</summary>
        [MethodImpl(MethodImplOptions.AggressiveInlining)]
        private TD Energy(TD x, TD y, TD z)
        {
            var sites = _sites;
            var e = TOps.Broadcast(0.0);
            for (int i = 0; i + 2 < sites.Length; i += 3)
            {
                var dx = TOps.Subtract(x, TOps.Broadcast(sites[i]));
                var dy = TOps.Subtract(y, TOps.Broadcast(sites[i + 1]));
                var dz = TOps.Subtract(z, TOps.Broadcast(sites[i + 2]));
                var r2 = TOps.Add(TOps.Add(TOps.Multiply(dx, dx), TOps.Multiply(dy, dy)), TOps.Multiply(dz, dz));
                e = TOps.Add(e, _potential.LaneEnergyAtSquaredDistance<TOps, TD, TB>(r2));
            }
            return e;
        }

        /// <summary>The confinement test (<see cref="Confinement.Contains"/>'s arithmetic) and whether the point lies within
        /// the wall band (distance to the wall below the band), without a square root.</summary>
        [MethodImpl(MethodImplOptions.AggressiveInlining)]
        private TD Inside(TD dx, TD dy, TD dz, out TD nearWall)
        {
            double size = _plan.Confinement.SizeInAngstroms;
            double innerEdge = Math.Max(size - _plan.WallBand, 0); // |d| beyond this is within the band of the wall
            if (_sphere)
            {
                var r2 = TOps.Add(TOps.Add(TOps.Multiply(dx, dx), TOps.Multiply(dy, dy)), TOps.Multiply(dz, dz));
                nearWall = TOps.GreaterThan(r2, TOps.Broadcast(innerEdge * innerEdge));
                return TOps.LessOrEqual(r2, TOps.Broadcast(size * size));
            }
            var ax = TOps.Abs(dx);
            var ay = TOps.Abs(dy);
            var az = TOps.Abs(dz);
            var largest = TOps.Select(TOps.LessThan(ax, ay), ay, ax);
            largest = TOps.Select(TOps.LessThan(largest, az), az, largest);
            nearWall = TOps.GreaterThan(largest, TOps.Broadcast(innerEdge));
            return TOps.LessOrEqual(largest, TOps.Broadcast(size));
        }

        private static TD Distance(TD x, TD y, TD z) => TOps.Sqrt(TOps.Add(TOps.Add(TOps.Multiply(x, x), TOps.Multiply(y, y)), TOps.Multiply(z, z)));

        internal void Start(ref SiteWalk<TD, TB> w, TD x, TD y, TD z)
        {
            var e = Energy(x, y, z);
            var faults = LaneFaultCheck.None<TOps, TD, TB>();
            LaneFaultCheck.Note<TOps, TD, TB>(ref faults, TOps.Broadcast(0.0), e);
            if (!TOps.AllTrue(faults.AllFinite))
            {
                ThrowAt(faults, x, y, z);
            }
            w.X = x;
            w.Y = y;
            w.Z = z;
            w.Energy = e;
        }

        /// <summary>
        /// One step in every lane; returns the acceptance mask and the point whose energy was evaluated (the proposal, or the
        /// current point where the proposal left the confinement). The chunk loops discard that point, and their machine
        /// code is the same as without it (the JIT listings were compared).
        /// </summary>
        [MethodImpl(MethodImplOptions.AggressiveInlining)]
        private TD Step(ref TD x, ref TD y, ref TD z, ref TD energy, ref TB r0, ref TB r1, ref TB r2, ref TB r3, TD scale, TD negativeBeta, ref LaneFaults<TD> faults,
            out TD evaluatedX, out TD evaluatedY, out TD evaluatedZ)
        {
            var a = TOps.Multiply(scale, LaneMath.NextOffsetPair<TOps, TD, TB>(ref r0, ref r1, ref r2, ref r3, out var bUnit));
            var b = TOps.Multiply(scale, bUnit);
            var c = TOps.Multiply(scale, LaneMath.NextOffsetPair<TOps, TD, TB>(ref r0, ref r1, ref r2, ref r3, out _));
            var u = LaneMath.NextUnit<TOps, TD, TB>(ref r0, ref r1, ref r2, ref r3);
            var px = TOps.MultiplyAdd(TOps.Broadcast(_plan.L00), a, x);
            var py = TOps.MultiplyAdd(TOps.Broadcast(_plan.L11), b, TOps.MultiplyAdd(TOps.Broadcast(_plan.L10), a, y));
            var pz = TOps.MultiplyAdd(TOps.Broadcast(_plan.L22), c, TOps.MultiplyAdd(TOps.Broadcast(_plan.L21), b, TOps.MultiplyAdd(TOps.Broadcast(_plan.L20), a, z)));
            var centre = _plan.Centre;
            var inside = Inside(TOps.Subtract(px, TOps.Broadcast(centre.X)), TOps.Subtract(py, TOps.Broadcast(centre.Y)), TOps.Subtract(pz, TOps.Broadcast(centre.Z)), out _);
            // Outside lanes evaluate the current point and are rejected below.
            px = TOps.Select(inside, px, x);
            py = TOps.Select(inside, py, y);
            pz = TOps.Select(inside, pz, z);
            (evaluatedX, evaluatedY, evaluatedZ) = (px, py, pz);
            var candidate = Energy(px, py, pz);
            LaneFaultCheck.Note<TOps, TD, TB>(ref faults, TOps.Broadcast(0.0), candidate);
            var ratio = LaneMath.Exp<TOps, TD, TB>(TOps.Multiply(negativeBeta, TOps.Subtract(candidate, energy)));
            var accept = TOps.And(inside, TOps.LessThan(u, ratio));
            x = TOps.Select(accept, px, x);
            y = TOps.Select(accept, py, y);
            z = TOps.Select(accept, pz, z);
            energy = TOps.Select(accept, candidate, energy);
            return accept;
        }

        /// <summary>A chunk of burn-in, in a method with no calls inside so the walk stays in registers.</summary>
        [MethodImpl(MethodImplOptions.NoInlining | MethodImplOptions.AggressiveOptimization)]
        internal TD AdaptChunk(ref SiteWalk<TD, TB> w, TD logScale, double[] gains, int chunk)
        {
            TD x = w.X, y = w.Y, z = w.Z, energy = w.Energy, negativeBeta = w.NegativeBeta;
            TB r0 = w.R0, r1 = w.R1, r2 = w.R2, r3 = w.R3;
            var faults = w.Faults;
            var logMax = TOps.Broadcast(Math.Log(_plan.MaxScale));
            for (int j = 0; j < chunk; j++)
            {
                var accept = Step(ref x, ref y, ref z, ref energy, ref r0, ref r1, ref r2, ref r3, LaneAdaptation.Width<TOps, TD, TB>(logScale, _plan.MaxScale), negativeBeta, ref faults,
                    out _, out _, out _);
                logScale = LaneAdaptation.Update<TOps, TD, TB>(logScale, accept, _plan.TargetAcceptance, gains[j], logMax);
            }
            (w.X, w.Y, w.Z, w.Energy) = (x, y, z, energy);
            (w.R0, w.R1, w.R2, w.R3) = (r0, r1, r2, r3);
            w.Faults = faults;
            return logScale;
        }

        /// <summary>
        /// Throws for a chunk that noted a NaN or −∞ energy. The chunk loops keep no per-lane fault position (registers are
        /// scarce there), so the chunk is replayed step by step from the walk as it was before it (<paramref name="before"/>;
        /// with the burn-in's width and gains when <paramref name="gains"/> is set, else at the frozen <paramref name="scale"/>)
        /// until the first step that faults, and the error names the separation of the pair that failed at the point
        /// evaluated there. Only this error path pays for the replay.
        /// </summary>
        internal void ThrowAtFirstFault(SiteWalk<TD, TB> before, in LaneFaults<TD> noted, TD logScale, double[]? gains, TD scale, int chunk)
        {
            TD x = before.X, y = before.Y, z = before.Z, energy = before.Energy, negativeBeta = before.NegativeBeta;
            TB r0 = before.R0, r1 = before.R1, r2 = before.R2, r3 = before.R3;
            var logMax = TOps.Broadcast(Math.Log(_plan.MaxScale));
            for (int j = 0; j < chunk; j++)
            {
                var faults = LaneFaultCheck.None<TOps, TD, TB>();
                var width = gains is null ? scale : LaneAdaptation.Width<TOps, TD, TB>(logScale, _plan.MaxScale);
                var accept = Step(ref x, ref y, ref z, ref energy, ref r0, ref r1, ref r2, ref r3, width, negativeBeta, ref faults, out var ex, out var ey, out var ez);
                if (!TOps.AllTrue(faults.AllFinite))
                {
                    ThrowAt(faults, ex, ey, ez);
                }
                if (gains is not null)
                {
                    logScale = LaneAdaptation.Update<TOps, TD, TB>(logScale, accept, _plan.TargetAcceptance, gains[j], logMax);
                }
            }
            // Not reproduced (a potential whose value changes between calls): the noted energy, with no separation.
            int lane = LaneFaultCheck.FirstFaultedLane<TOps, TD, TB>(noted);
            throw new NonFiniteEnergyException(double.NaN, TOps.Get(noted.Energy, lane), _plan.Description);
        }

        /// <summary>Throws for the first faulted lane of <paramref name="faults"/>, naming the separation of the pair that failed at that lane's point.</summary>
        private void ThrowAt(in LaneFaults<TD> faults, TD x, TD y, TD z)
        {
            int lane = LaneFaultCheck.FirstFaultedLane<TOps, TD, TB>(faults);
            double separation = SitePairs.OffendingSeparation(_potential, _sites, TOps.Get(x, lane), TOps.Get(y, lane), TOps.Get(z, lane));
            throw new NonFiniteEnergyException(separation, TOps.Get(faults.Energy, lane), _plan.Description);
        }

        /// <summary>A chunk of the recorded phase, with no calls inside; batches closed in it leave their sums in the tally.</summary>
        [MethodImpl(MethodImplOptions.NoInlining | MethodImplOptions.AggressiveOptimization)]
        internal int RecordChunk(ref SiteWalk<TD, TB> w, TD scale, int chunk, long done, ref int inBatch, int batchSize, SiteTally tally)
        {
            TD x = w.X, y = w.Y, z = w.Z, energy = w.Energy, negativeBeta = w.NegativeBeta;
            TB r0 = w.R0, r1 = w.R1, r2 = w.R2, r3 = w.R3;
            var faults = w.Faults;
            // Individual locals, not the sum structs: a struct copy or clear here becomes a memcpy call, and any call in the
            // loop sends every vector register to memory.
            TD sX = w.Sums.X, sY = w.Sums.Y, sZ = w.Sums.Z, sXX = w.Sums.XX, sYY = w.Sums.YY, sZZ = w.Sums.ZZ, sXY = w.Sums.XY, sXZ = w.Sums.XZ, sYZ = w.Sums.YZ;
            TD bX = w.Batch.X, bY = w.Batch.Y, bZ = w.Batch.Z, bXX = w.Batch.XX, bYY = w.Batch.YY, bZZ = w.Batch.ZZ, bE = w.Batch.XY, bEE = w.Batch.XZ;
            var energyReference = TOps.Broadcast(tally.EnergyReference);
            TD accepted = w.Accepted, nearWall = w.NearWall;
            var one = TOps.Broadcast(1.0);
            var zero = TOps.Broadcast(0.0);
            var minimum = _plan.Minimum;
            var centre = _plan.Centre;
            var binScale = TOps.Broadcast(tally.BinScale);
            var binCount = TOps.Broadcast(tally.Bins);
            var lastBin = TOps.Broadcast(tally.Bins - 1);
            var laneOffsets = TOps.BroadcastBits(0);
            for (int lane = 0; lane < TOps.Count; lane++)
            {
                laneOffsets = TOps.SetBits(laneOffsets, lane, (ulong)(Math.Min(lane, tally.Lanes - 1) * tally.Bins));
            }
            var counts = tally.Counts;
            var index = tally.Index;
            var grid = tally.Basin;
            var outsideMask = grid.Outside;
            var outsideBasin = tally.OutsideBasin;
            bool countOutside = grid.AnyOutside;
            var gridX0 = TOps.Broadcast(grid.X0);
            var gridY0 = TOps.Broadcast(grid.Y0);
            var gridZ0 = TOps.Broadcast(grid.Z0);
            var gridScale = TOps.Broadcast(1 / grid.Spacing);
            var gridN = TOps.Broadcast(grid.N);
            var roundShift = TOps.Broadcast(4503599627370496.0); // 2^52
            var scratch = tally.Scratch;
            var kept = tally.Kept;
            var batchSums = tally.BatchSums;
            long keptStride = tally.Retained;
            int lanes = tally.Lanes, closed = 0, filled = inBatch;
            long retain = Math.Max(0, Math.Min(chunk, tally.Retained - done));
            for (int j = 0; j < chunk; j++)
            {
                var accept = Step(ref x, ref y, ref z, ref energy, ref r0, ref r1, ref r2, ref r3, scale, negativeBeta, ref faults, out _, out _, out _);
                accepted = TOps.Add(accepted, TOps.Select(accept, one, zero));

                // Deviations from the harmonic minimum (within the confinement, so small): the covariance block sums (converted
                // by CovarianceAccumulator.FromRawSums) and the batch sums per axis (BatchMeansStore's rule) share them.
                var mx = TOps.Subtract(x, TOps.Broadcast(minimum.X));
                var my = TOps.Subtract(y, TOps.Broadcast(minimum.Y));
                var mz = TOps.Subtract(z, TOps.Broadcast(minimum.Z));
                sX = TOps.Add(sX, mx);
                sY = TOps.Add(sY, my);
                sZ = TOps.Add(sZ, mz);
                sXX = TOps.MultiplyAdd(mx, mx, sXX);
                sYY = TOps.MultiplyAdd(my, my, sYY);
                sZZ = TOps.MultiplyAdd(mz, mz, sZZ);
                sXY = TOps.MultiplyAdd(mx, my, sXY);
                sXZ = TOps.MultiplyAdd(mx, mz, sXZ);
                sYZ = TOps.MultiplyAdd(my, mz, sYZ);
                bX = TOps.Add(bX, mx);
                bY = TOps.Add(bY, my);
                bZ = TOps.Add(bZ, mz);
                bXX = TOps.Add(bXX, TOps.Multiply(mx, mx));
                bYY = TOps.Add(bYY, TOps.Multiply(my, my));
                bZZ = TOps.Add(bZZ, TOps.Multiply(mz, mz));
                var de = TOps.Subtract(energy, energyReference); // the same batches of V − V_min (what reweighting needs)
                bE = TOps.Add(bE, de);
                bEE = TOps.Add(bEE, TOps.Multiply(de, de));
                if (++filled == batchSize)
                {
                    int at = 8 * closed * TOps.Count;
                    TOps.Store(bX, ref batchSums[at]);
                    TOps.Store(bXX, ref batchSums[at + TOps.Count]);
                    TOps.Store(bY, ref batchSums[at + 2 * TOps.Count]);
                    TOps.Store(bYY, ref batchSums[at + 3 * TOps.Count]);
                    TOps.Store(bZ, ref batchSums[at + 4 * TOps.Count]);
                    TOps.Store(bZZ, ref batchSums[at + 5 * TOps.Count]);
                    TOps.Store(bE, ref batchSums[at + 6 * TOps.Count]);
                    TOps.Store(bEE, ref batchSums[at + 7 * TOps.Count]);
                    bX = bY = bZ = bXX = bYY = bZZ = bE = bEE = zero;
                    closed++;
                    filled = 0;
                }

                // The near-wall fraction (within the band of the wall) and the radial histogram about the minimum.
                Inside(TOps.Subtract(x, TOps.Broadcast(centre.X)), TOps.Subtract(y, TOps.Broadcast(centre.Y)), TOps.Subtract(z, TOps.Broadcast(centre.Z)), out var near);
                nearWall = TOps.Add(nearWall, TOps.Select(near, one, zero));
                var t = TOps.Multiply(Distance(mx, my, mz), binScale);
                t = TOps.Select(TOps.LessThan(t, binCount), t, lastBin);
                TOps.StoreBits(TOps.AddBits(TOps.Truncate(t), laneOffsets), ref index[0]);
                for (int lane = 0; lane < lanes; lane++)
                {
                    counts[index[lane]]++;
                }

                // Basin membership by the nearest point of the basin grid, only when the confinement reaches outside the basin
                // (a loop-invariant branch): i = round((x − x0)/h) by adding and removing 2^52 (exact for 0 ≤ t < 2^51), the
                // flat index (k·N + j)·N + i formed in the vector, one byte looked up per lane.
                if (countOutside)
                {
                    var gi = TOps.Subtract(TOps.MultiplyAdd(TOps.Subtract(x, gridX0), gridScale, roundShift), roundShift);
                    var gj = TOps.Subtract(TOps.MultiplyAdd(TOps.Subtract(y, gridY0), gridScale, roundShift), roundShift);
                    var gk = TOps.Subtract(TOps.MultiplyAdd(TOps.Subtract(z, gridZ0), gridScale, roundShift), roundShift);
                    var flat = TOps.MultiplyAdd(TOps.MultiplyAdd(gk, gridN, gj), gridN, gi);
                    TOps.StoreBits(TOps.Truncate(flat), ref index[0]);
                    for (int lane = 0; lane < lanes; lane++)
                    {
                        outsideBasin[lane] += outsideMask[index[lane]];
                    }
                }
                if (j < retain)
                {
                    long at = done + j;
                    TOps.Store(x, ref scratch[0]);
                    TOps.Store(y, ref scratch[TOps.Count]);
                    TOps.Store(z, ref scratch[2 * TOps.Count]);
                    for (int lane = 0; lane < lanes; lane++)
                    {
                        long row = 3 * (lane * keptStride + at);
                        kept[row] = scratch[lane];
                        kept[row + 1] = scratch[TOps.Count + lane];
                        kept[row + 2] = scratch[2 * TOps.Count + lane];
                    }
                }
            }
            (w.X, w.Y, w.Z, w.Energy) = (x, y, z, energy);
            (w.R0, w.R1, w.R2, w.R3) = (r0, r1, r2, r3);
            w.Faults = faults;
            w.Sums = new LaneSums3<TD> { X = sX, Y = sY, Z = sZ, XX = sXX, YY = sYY, ZZ = sZZ, XY = sXY, XZ = sXZ, YZ = sYZ };
            // The batch sums use the cross-product slots of LaneSums3 for the energy (batches need no cross products).
            w.Batch = new LaneSums3<TD> { X = bX, Y = bY, Z = bZ, XX = bXX, YY = bYY, ZZ = bZZ, XY = bE, XZ = bEE, YZ = zero };
            w.Accepted = accepted;
            w.NearWall = nearWall;
            inBatch = filled;
            return closed;
        }
    }

    /// <summary>Histogram counts, batch sums and retained draws of a lane group, in flat arrays the inner loop reaches without calls.</summary>
    private sealed class SiteTally(BinCounter radial, int retained, int width, int lanes, BasinGrid basin, double energyReference)
        : LaneTally(radial, retained, width, lanes, 3, batchValues: 8)
    {
        /// <summary>The reference the energy batch sums are taken about (the harmonic minimum's energy).</summary>
        internal double EnergyReference { get; } = energyReference;

        /// <summary>The site's basin map, for the membership test of every draw.</summary>
        internal BasinGrid Basin { get; } = basin;

        /// <summary>Recorded draws outside the site's basin, per live lane.</summary>
        internal long[] OutsideBasin { get; } = new long[lanes];

        internal void CopyTo((BatchMeansStore[] Stores, BinCounter Radial, DrawRecorder<Position> Draws)[] records, long samples)
        {
            long kept = Math.Min(samples, Retained);
            for (int lane = 0; lane < Lanes; lane++)
            {
                records[lane].Radial.AddCounts(Counts.AsSpan(lane * Bins, Bins));
                for (long k = 0; k < kept; k++)
                {
                    long row = 3 * (lane * (long)Retained + k);
                    records[lane].Draws.Add(new Position(Kept[row], Kept[row + 1], Kept[row + 2]));
                }
            }
        }
    }
}

// Stryker disable all : vector-lane kernel, in no mutation mode (eng/mutation-testing.sh); LaneKernelTests checks it bit for bit
/// <summary>Nine running sums of a 3D walk: Σd, Σd² and the cross products, per lane.</summary>
/// <typeparam name="TD">The lane type.</typeparam>
[StructLayout(LayoutKind.Sequential)]
internal struct LaneSums3<TD> where TD : struct
{
    internal TD X, Y, Z, XX, YY, ZZ, XY, XZ, YZ;
}

// Stryker disable all : vector-lane kernel, in no mutation mode (eng/mutation-testing.sh); LaneKernelTests checks it bit for bit
/// <summary>The running state of every lane of a site group.</summary>
/// <typeparam name="TD">The lane type.</typeparam>
/// <typeparam name="TB">The lane word type.</typeparam>
[StructLayout(LayoutKind.Sequential)]
internal struct SiteWalk<TD, TB>
    where TD : struct
    where TB : struct
{
    internal TD X, Y, Z, Energy, Accepted, NearWall, NegativeBeta;
    internal TB R0, R1, R2, R3;
    internal LaneSums3<TD> Sums, Batch;
    internal LaneFaults<TD> Faults;
}
