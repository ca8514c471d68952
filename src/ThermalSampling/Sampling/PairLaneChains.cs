using System;
using System.Runtime.CompilerServices;
using System.Runtime.InteropServices;
using System.Runtime.Intrinsics;
using System.Threading;
using ThermalSampling.Persistence;
using ThermalSampling.Numerics;
using ThermalSampling.Potentials;
using ThermalSampling.Randomness;
using ThermalSampling.Statistics;

namespace ThermalSampling.Sampling;

// Stryker disable all : vector-lane kernel, in no mutation mode (eng/mutation-testing.sh); LaneKernelTests checks it bit for bit
/// <summary>
/// Random-walk Metropolis for line and radial pairs, several chains in lockstep (one per vector lane). Per step and lane:
/// r' = r + w(2u₁ − 1 + 2^−52) (uniform on a grid symmetric about 0, so the proposal is exactly symmetric); r' outside the window is rejected; otherwise accepted when
/// u₂·J(r) &lt; J(r')·e^(−(V(r') − V(r))/kT), with J = 1 (line) or r² (radial). During burn-in each lane's width follows
/// <see cref="LaneAdaptation"/>'s rule; then it freezes. Every chain uses its own stream
/// (<see cref="RandomStream.ForChain"/>), so the draws of chain c are the same bits at any lane width and thread count.
/// </summary>
internal static class PairLaneChains
{
    private const int ChunkSteps = LaneAdaptation.ChunkSteps;

    /// <summary>Everything fixed for a run.</summary>
    /// <remarks>ChainBetas: β of each chain when they differ (a temperature ladder in one register); null: every chain at Beta.</remarks>
    internal sealed record Plan<TPotential>(TPotential Potential, double Lower, double Upper, double Beta, bool Radial, double InitialWidth,
        double TargetAcceptance, double MaxWidth, long BurnIn, long Samples, ulong Seed, double[]? ChainBetas = null) where TPotential : struct, IPairPotential
    {
        /// <summary>The inverse temperature of chain <paramref name="chain"/>, 1/eV.</summary>
        internal double BetaOf(int chain) => ChainBetas?[chain] ?? Beta;
    }

    /// <summary>Runs chains <paramref name="firstChain"/> … firstChain + lanes − 1 (those at or beyond the chain count are computed and dropped),
    /// from the start or from the group's checkpointed state.</summary>
    internal static PairChainOutcome[] Run<TPotential>(int lanes, Plan<TPotential> plan, int firstChain, int chains, Func<int, double> start,
        Func<int, PairChainRecord> record, Func<int, ProgressReporter> progress, GroupCheckpoints checkpoints, int group, CancellationToken ct)
        where TPotential : struct, IPairPotential
        => LaneWidths.Dispatch<GroupJob<TPotential>, PairChainOutcome[]>(lanes, new(plan, firstChain, chains, start, record, progress, checkpoints, group, ct));

    /// <summary>A pair lane group at the width the dispatcher picks.</summary>
    private readonly record struct GroupJob<TPotential>(Plan<TPotential> Plan, int FirstChain, int Chains, Func<int, double> Start,
        Func<int, PairChainRecord> Record, Func<int, ProgressReporter> Progress, GroupCheckpoints Checkpoints, int Group, CancellationToken Ct)
        : ILaneWidthJob<PairChainOutcome[]>
        where TPotential : struct, IPairPotential
    {
        public PairChainOutcome[] Run<TOps, TD, TB>()
            where TOps : struct, ILaneOps<TD, TB>
            where TD : struct
            where TB : struct
            => new Group<TOps, TD, TB, TPotential>(Plan, FirstChain, Chains, Start, Record, Progress).Run(Checkpoints, Group, Ct);
    }

    /// <summary>One lane group of pair chains on the lane engine: the pair walk's state, its kernels and its records.</summary>
    private sealed class Group<TOps, TD, TB, TPotential> : LaneEngine<TOps, TD, TB, Walk<TD, TB>>
        where TOps : struct, ILaneOps<TD, TB>
        where TD : struct
        where TB : struct
        where TPotential : struct, IPairPotential
    {
        private readonly PairChainRecord[] _records;
        private readonly Plan<TPotential> _plan;
        private readonly Kernel<TOps, TD, TB, TPotential> _kernel;
        private readonly Tally _tally;
        private readonly Func<int, double> _start;
        private TD _starts;

        internal Group(Plan<TPotential> plan, int firstChain, int chains, Func<int, double> start, Func<int, PairChainRecord> makeRecord,
            Func<int, ProgressReporter> makeProgress)
            : base(new EngineSettings(plan.BurnIn, plan.Samples, plan.InitialWidth, plan.MaxWidth, BlockedMomentAccumulator.BlockSize, "PLGH", "LOGW", "pair chain group"),
                firstChain, chains, MakeReporters(firstChain, chains, makeProgress))
        {
            _plan = plan;
            _start = start;
            _records = new PairChainRecord[Live];
            for (int lane = 0; lane < Live; lane++)
            {
                _records[lane] = makeRecord(firstChain + lane);
            }
            _kernel = new Kernel<TOps, TD, TB, TPotential>(plan);
            _tally = new Tally(_records[0], TOps.Count, Live);
        }

        internal PairChainOutcome[] Run(GroupCheckpoints checkpoints, int group, CancellationToken ct)
        {
            var stepWidth = RunLanes(checkpoints, group, ct);
            var outcomes = new PairChainOutcome[Live];
            for (int lane = 0; lane < Live; lane++)
            {
                outcomes[lane] = new PairChainOutcome(_records[lane], (long)TOps.Get(State.Accepted, lane), TOps.Get(stepWidth, lane));
            }
            return outcomes;
        }

        private protected override void PlaceLane(int lane, int chain)
        {
            SeedLane(ref State.R0, ref State.R1, ref State.R2, ref State.R3, lane, RandomStream.ForChain(_plan.Seed, chain));
            State.NegativeBeta = TOps.Set(State.NegativeBeta, lane, -_plan.BetaOf(chain)); // β per lane: one register may hold several temperatures
            _starts = TOps.Set(_starts, lane, _start(chain));
        }

        private protected override void Start() => _kernel.Start(ref State, _starts);

        private protected override TD AdaptChunk(TD logWidth, double[] gains, int chunk) => _kernel.AdaptChunk(ref State, logWidth, gains, chunk);

        private protected override int RecordChunk(TD width, int chunk, long done, ref int inBatch, int batchSize)
            => _kernel.RecordChunk(ref State, width, chunk, done, ref inBatch, batchSize, _tally);

        private protected override void ClearFaults() => State.Faults = Kernel<TOps, TD, TB, TPotential>.NoFaults;

        private protected override void ThrowIfFaulted(in Walk<TD, TB> before, TD logWidthBefore, double[]? gains, TD width, int chunk)
            => _kernel.ThrowIfFaulted(State.Faults);

        private protected override void ResetForRecording()
        {
            var zero = TOps.Broadcast(0.0);
            State.S1 = State.S2 = State.S3 = State.S4 = State.B1 = State.B2 = State.E1 = State.E2 = State.Accepted = zero;
            State.BlockReference = State.Position;
        }

        private protected override int BatchSize => _records[0].Store.BatchSize;

        private protected override void AddClosedBatches(int closed)
        {
            for (int k = 0; k < closed; k++)
            {
                for (int lane = 0; lane < _records.Length; lane++)
                {
                    _records[lane].Store.AddBatchSums(_tally.BatchSums[4 * k * TOps.Count + lane], _tally.BatchSums[(4 * k + 1) * TOps.Count + lane]);
                    _records[lane].Energies.AddBatchSums(_tally.BatchSums[(4 * k + 2) * TOps.Count + lane], _tally.BatchSums[(4 * k + 3) * TOps.Count + lane]);
                }
            }
        }

        private protected override void CloseBlock(int count)
        {
            for (int lane = 0; lane < _records.Length; lane++)
            {
                _records[lane].AddMomentBlock(count, TOps.Get(State.BlockReference, lane), TOps.Get(State.S1, lane), TOps.Get(State.S2, lane),
                    TOps.Get(State.S3, lane), TOps.Get(State.S4, lane));
            }
            var zero = TOps.Broadcast(0.0);
            State.S1 = State.S2 = State.S3 = State.S4 = zero;
            State.BlockReference = State.Position;
        }

        private protected override void SaveRecords(StateWriter w)
        {
            foreach (var record in _records)
            {
                record.Save(w);
            }
            _tally.Save(w, RecordedSteps);
        }

        private protected override void LoadRecords(StateReader r)
        {
            foreach (var record in _records)
            {
                record.Load(r);
            }
            _tally.Load(r, RecordedSteps);
        }

        private protected override void Complete() => _tally.CopyTo(_records, _plan.Samples);
    }

    private readonly struct Kernel<TOps, TD, TB, TPotential>
        where TOps : struct, ILaneOps<TD, TB>
        where TD : struct
        where TB : struct
        where TPotential : struct, IPairPotential
    {
        private readonly TPotential _potential;
        private readonly double _lower, _upper, _target, _maxWidth;
        private readonly bool _radial;

        internal Kernel(Plan<TPotential> plan)
        {
            _potential = plan.Potential;
            _lower = plan.Lower;
            _upper = plan.Upper;
            _radial = plan.Radial;
            _target = plan.TargetAcceptance;
            _maxWidth = plan.MaxWidth;
        }

        internal void Start(ref Walk<TD, TB> w, TD r)
        {
            var e = Energy(r);
            var faults = NoFaults;
            NoteFaults(r, e, ref faults);
            ThrowIfFaulted(faults);
            w.Position = r;
            w.Energy = e;
            w.Jacobian = _radial ? TOps.Multiply(r, r) : TOps.Broadcast(1.0);
        }

        internal TD WidthFrom(TD logWidth) => LaneAdaptation.Width<TOps, TD, TB>(logWidth, _maxWidth);

        [MethodImpl(MethodImplOptions.AggressiveInlining)]
        private TD Energy(TD r) => _potential.LaneEnergy<TOps, TD, TB>(r);

        [MethodImpl(MethodImplOptions.AggressiveInlining)]
        private static void NoteFaults(TD r, TD e, ref LaneFaults<TD> faults) => LaneFaultCheck.Note<TOps, TD, TB>(ref faults, r, e);

        internal void ThrowIfFaulted(in LaneFaults<TD> faults) => LaneFaultCheck.ThrowIfAny<TOps, TD, TB>(faults, _potential.Description);

        internal static LaneFaults<TD> NoFaults => LaneFaultCheck.None<TOps, TD, TB>();

        /// <summary>One step in every lane; returns the acceptance mask. State comes as separate locals so that it stays in registers.</summary>
        [MethodImpl(MethodImplOptions.AggressiveInlining)]
        private TD Step(ref TD position, ref TD energy, ref TD jacobian, ref TB r0, ref TB r1, ref TB r2, ref TB r3, TD width, TD negativeBeta, ref LaneFaults<TD> faults)
        {
            var u1 = LaneMath.NextUnit<TOps, TD, TB>(ref r0, ref r1, ref r2, ref r3);
            var u2 = LaneMath.NextUnit<TOps, TD, TB>(ref r0, ref r1, ref r2, ref r3);
            var one = TOps.Broadcast(1.0);
            // 2u − (1 − 2^−52): the 52-bit grid of u shifted half a cell, so the offsets are symmetric about 0 and so is the proposal.
            var proposal = TOps.MultiplyAdd(width, TOps.Subtract(TOps.Add(u1, u1), TOps.Broadcast(1.0 - 1.0 / 4503599627370496.0)), position);
            var inside = TOps.And(TOps.LessOrEqual(TOps.Broadcast(_lower), proposal), TOps.LessOrEqual(proposal, TOps.Broadcast(_upper)));
            var candidate = TOps.Select(inside, proposal, position); // outside lanes evaluate the current point and are rejected below
            var candidateEnergy = Energy(candidate);
            NoteFaults(candidate, candidateEnergy, ref faults);
            var ratio = LaneMath.Exp<TOps, TD, TB>(TOps.Multiply(negativeBeta, TOps.Subtract(candidateEnergy, energy)));
            TD accept;
            if (_radial)
            {
                var candidateJacobian = TOps.Multiply(candidate, candidate);
                accept = TOps.And(inside, TOps.LessThan(TOps.Multiply(u2, jacobian), TOps.Multiply(candidateJacobian, ratio)));
                jacobian = TOps.Select(accept, candidateJacobian, jacobian);
            }
            else
            {
                accept = TOps.And(inside, TOps.LessThan(u2, ratio));
            }
            position = TOps.Select(accept, candidate, position);
            energy = TOps.Select(accept, candidateEnergy, energy);
            return accept;
        }

        /// <summary>
        /// One chunk of burn-in. A separate method with no calls inside, so that the JIT keeps the whole walk in
        /// registers (any call in the loop would force every vector register to memory: they are all caller-saved).
        /// </summary>
        [MethodImpl(MethodImplOptions.NoInlining | MethodImplOptions.AggressiveOptimization)]
        internal TD AdaptChunk(ref Walk<TD, TB> walk, TD logWidth, double[] gains, int chunk)
        {
            TD position = walk.Position, energy = walk.Energy, jacobian = walk.Jacobian, negativeBeta = walk.NegativeBeta;
            TB r0 = walk.R0, r1 = walk.R1, r2 = walk.R2, r3 = walk.R3;
            var faults = walk.Faults;
            var logMax = TOps.Broadcast(Math.Log(_maxWidth));
            for (int j = 0; j < chunk; j++)
            {
                var accept = Step(ref position, ref energy, ref jacobian, ref r0, ref r1, ref r2, ref r3, WidthFrom(logWidth), negativeBeta, ref faults);
                logWidth = LaneAdaptation.Update<TOps, TD, TB>(logWidth, accept, _target, gains[j], logMax);
            }
            walk.Position = position;
            walk.Energy = energy;
            walk.Jacobian = jacobian;
            walk.R0 = r0;
            walk.R1 = r1;
            walk.R2 = r2;
            walk.R3 = r3;
            walk.Faults = faults;
            return logWidth;
        }

        /// <summary>
        /// One chunk of the recorded phase; like <see cref="AdaptChunk"/>, a separate method with no calls inside. Batches
        /// that close inside the chunk leave their sums in <see cref="LaneTally.BatchSums"/>; returns how many closed.
        /// </summary>
        [MethodImpl(MethodImplOptions.NoInlining | MethodImplOptions.AggressiveOptimization)]
        internal int RecordChunk(ref Walk<TD, TB> walk, TD width, int chunk, long done, ref int inBatch, int batchSize, Tally tally)
        {
            int closed = 0, filled = inBatch;
            var batchSums = tally.BatchSums;
            TD position = walk.Position, energy = walk.Energy, jacobian = walk.Jacobian, negativeBeta = walk.NegativeBeta;
            TB r0 = walk.R0, r1 = walk.R1, r2 = walk.R2, r3 = walk.R3;
            TD accepted = walk.Accepted, s1 = walk.S1, s2 = walk.S2, s3 = walk.S3, s4 = walk.S4, b1 = walk.B1, b2 = walk.B2, e1 = walk.E1, e2 = walk.E2;
            var faults = walk.Faults;
            var blockReference = walk.BlockReference;
            var one = TOps.Broadcast(1.0);
            var zero = TOps.Broadcast(0.0);
            var batchReference = TOps.Broadcast(tally.BatchReference);
            var energyReference = TOps.Broadcast(tally.EnergyReference);
            var binLower = TOps.Broadcast(tally.BinLower);
            var binScale = TOps.Broadcast(tally.BinScale);
            var counts = tally.Counts;
            var scaled = tally.Scratch;
            var kept = tally.Kept;
            long keptStride = tally.Retained;
            int lanes = tally.Lanes;
            var binCount = TOps.Broadcast(tally.Bins);
            var lastBin = TOps.Broadcast(tally.Bins - 1);
            var laneOffsets = TOps.BroadcastBits(0);
            for (int lane = 0; lane < TOps.Count; lane++)
            {
                laneOffsets = TOps.SetBits(laneOffsets, lane, (ulong)(Math.Min(lane, lanes - 1) * tally.Bins)); // padding lanes are never counted
            }
            var index = tally.Index;
            long retain = Math.Max(0, Math.Min(chunk, tally.Retained - done)); // the first steps of the chain may be kept raw
            for (int j = 0; j < chunk; j++)
            {
                var accept = Step(ref position, ref energy, ref jacobian, ref r0, ref r1, ref r2, ref r3, width, negativeBeta, ref faults);
                accepted = TOps.Add(accepted, TOps.Select(accept, one, zero));
                var x = position;

                // Raw power sums about the position before the block (converted as BlockedMomentAccumulator does).
                var d = TOps.Subtract(x, blockReference);
                var d2 = TOps.Multiply(d, d);
                s1 = TOps.Add(s1, d);
                s2 = TOps.Add(s2, d2);
                s3 = TOps.Add(s3, TOps.Multiply(d2, d));
                s4 = TOps.Add(s4, TOps.Multiply(d2, d2));

                // Batch sums of x − ref and (x − ref)² (BatchMeansStore's rule).
                var b = TOps.Subtract(x, batchReference);
                b1 = TOps.Add(b1, b);
                b2 = TOps.Add(b2, TOps.Multiply(b, b));
                // The same batches of the potential energy, V − V_ref (what reweighting across temperatures needs).
                var de = TOps.Subtract(energy, energyReference);
                e1 = TOps.Add(e1, de);
                e2 = TOps.Add(e2, TOps.Multiply(de, de));
                if (++filled == batchSize)
                {
                    TOps.Store(b1, ref batchSums[4 * closed * TOps.Count]);
                    TOps.Store(b2, ref batchSums[(4 * closed + 1) * TOps.Count]);
                    TOps.Store(e1, ref batchSums[(4 * closed + 2) * TOps.Count]);
                    TOps.Store(e2, ref batchSums[(4 * closed + 3) * TOps.Count]);
                    closed++;
                    filled = 0;
                    b1 = b2 = e1 = e2 = zero;
                }

                // Histogram: x is inside the window, so t = (x − lower)·scale is in [0, bins]; t = bins (the upper wall) goes to
                // the last bin. The flat index lane·bins + ⌊t⌋ is formed in the vector; only the increments are per lane.
                var t = TOps.Multiply(TOps.Subtract(x, binLower), binScale);
                t = TOps.Select(TOps.LessThan(t, binCount), t, lastBin);
                TOps.StoreBits(TOps.AddBits(TOps.Truncate(t), laneOffsets), ref index[0]);
                for (int lane = 0; lane < lanes; lane++)
                {
                    counts[index[lane]]++;
                }
                if (j < retain)
                {
                    TOps.Store(x, ref scaled[0]);
                    for (int lane = 0; lane < lanes; lane++)
                    {
                        kept[lane * keptStride + done + j] = scaled[lane];
                    }
                }
            }
            walk.Position = position;
            walk.Energy = energy;
            walk.Jacobian = jacobian;
            walk.R0 = r0;
            walk.R1 = r1;
            walk.R2 = r2;
            walk.R3 = r3;
            walk.Accepted = accepted;
            walk.S1 = s1;
            walk.S2 = s2;
            walk.S3 = s3;
            walk.S4 = s4;
            walk.B1 = b1;
            walk.B2 = b2;
            walk.E1 = e1;
            walk.E2 = e2;
            walk.Faults = faults;
            inBatch = filled;
            return closed;
        }
    }

    /// <summary>The histogram counts and retained draws of a lane group, in flat arrays the inner loop can reach without calls.</summary>
    private sealed class Tally(PairChainRecord first, int width, int lanes) : LaneTally(first.Bins, first.Draws.Capacity, width, lanes, 1, batchValues: 4)
    {
        internal double BatchReference { get; } = first.Store.Reference;

        internal double EnergyReference { get; } = first.Energies.Reference;

        internal double BinLower { get; } = first.Bins.Lower;

        internal void CopyTo(PairChainRecord[] records, long samples)
        {
            long kept = Math.Min(samples, Retained);
            for (int lane = 0; lane < Lanes; lane++)
            {
                records[lane].Bins.AddCounts(Counts.AsSpan(lane * Bins, Bins));
                for (long k = 0; k < kept; k++)
                {
                    records[lane].Draws.Add(Kept[lane * Retained + k]);
                }
            }
        }
    }

    /// <summary>The running state of every lane of a group: position, energy, Jacobian, −β, random stream, sums and faults (saved
    /// word for word, field by field in this order, lanes within a field: docs/checkpoints.md).</summary>
    [StructLayout(LayoutKind.Sequential)]
    internal struct Walk<TD, TB>
        where TD : struct
        where TB : struct
    {
        internal TD Position, Energy, Jacobian, NegativeBeta;
        internal TB R0, R1, R2, R3;
        internal TD Accepted, S1, S2, S3, S4, B1, B2, E1, E2, BlockReference;
        internal LaneFaults<TD> Faults;
    }
}
