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

    /// <summary>Everything fixed for a run.</summary>
    /// <remarks>ChainBetas: β of each chain when they differ (a temperature ladder in one register); null: every chain at Beta.
    /// StreamOffset: chain c draws from stream StreamOffset + c of the seed (a ladder's rungs use disjoint streams).</remarks>
    internal sealed record Plan<TPotential>(TPotential Potential, double Lower, double Upper, double Beta, bool Radial, double InitialWidth,
        double TargetAcceptance, double MaxWidth, long BurnIn, long Samples, ulong Seed, double[]? ChainBetas = null, int StreamOffset = 0) where TPotential : struct, IPairPotential
    {
        /// <summary>The inverse temperature of chain <paramref name="chain"/>, 1/eV.</summary>
        internal double BetaOf(int chain) => ChainBetas?[chain] ?? Beta;
    }

    /// <summary>The group of chains <paramref name="firstChain"/> … firstChain + lanes − 1 (those at or beyond <paramref name="end"/> are computed and dropped),
    /// from the start or from the group's checkpointed state, each starting at <paramref name="start"/>(chain).</summary>
    internal static LaneGroup Build<TPotential>(int lanes, Plan<TPotential> plan, int firstChain, int end, Func<int, double> start,
        Func<int, ChainRecord> record, Func<int, ProgressReporter> progress, GroupCheckpoints checkpoints, int group, CancellationToken ct)
        where TPotential : struct, IPairPotential
        => LaneGroups.Build(lanes, new Starts<TPotential>(plan, start), new GroupWork(firstChain, end, record, progress, checkpoints, group, ct));

    /// <summary>Like <see cref="Build{TPotential}"/>, with each chain a ring polymer of <paramref name="ring"/>'s beads (the path-integral walk; a radial pair as its relative vector in three dimensions).</summary>
    internal static LaneGroup BuildRing<TPotential>(int lanes, Plan<TPotential> plan, RingPlan ring, int firstChain, int end, Func<int, double> start,
        Func<int, ChainRecord> record, Func<int, ProgressReporter> progress, GroupCheckpoints checkpoints, int group, CancellationToken ct)
        where TPotential : struct, IPairPotential
        => LaneGroups.Build(lanes, new RingStarts<TPotential>(plan, ring, start), new GroupWork(firstChain, end, record, progress, checkpoints, group, ct));

    /// <summary>The plan, the ring and the chains' starts: what builds a group of ring polymers at any width.</summary>
    private readonly record struct RingStarts<TPotential>(Plan<TPotential> Plan, RingPlan Ring, Func<int, double> Start) : ILanePlan where TPotential : struct, IPairPotential
    {
        public LaneGroup Build<TOps, TD, TB>(GroupWork work)
            where TOps : struct, ILaneOps<TD, TB>
            where TD : struct
            where TB : struct
        {
            var plan = Plan;
            var start = Start;
            var settings = new EngineSettings(plan.BurnIn, plan.Samples, plan.InitialWidth, plan.MaxWidth, plan.TargetAcceptance, BlockedMomentAccumulator.BlockSize,
                "RPGH", "LOGW", "pair ring-polymer group");
            Func<int, (RandomStream, double, double)> place = c => (RandomStream.ForChain(plan.Seed, plan.StreamOffset + c), plan.BetaOf(c), start(c));
            var (beads, segment, hbar2m) = (Ring.Beads, Ring.Segment, Ring.HbarSquaredOverMass);
            return plan.Radial
                ? new Group<TOps, TD, TB, RingWalk<TOps, TD, TB, RadialField<TOps, TD, TB, TPotential>>, RingState<TD, TB>>(settings,
                    new(new(plan.Potential, plan.Lower, plan.Upper), beads, segment, hbar2m, Ring.Moves), place, work)
                : new Group<TOps, TD, TB, RingWalk<TOps, TD, TB, LineField<TOps, TD, TB, TPotential>>, RingState<TD, TB>>(settings,
                    new(new(plan.Potential, plan.Lower, plan.Upper), beads, segment, hbar2m, Ring.Moves), place, work);
        }
    }

    /// <summary>The plan and the chains' starts: what builds a pair group at any width.</summary>
    private readonly record struct Starts<TPotential>(Plan<TPotential> Plan, Func<int, double> Start) : ILanePlan where TPotential : struct, IPairPotential
    {
        public LaneGroup Build<TOps, TD, TB>(GroupWork work)
            where TOps : struct, ILaneOps<TD, TB>
            where TD : struct
            where TB : struct
        {
            var plan = Plan;
            var start = Start;
            var settings = new EngineSettings(plan.BurnIn, plan.Samples, plan.InitialWidth, plan.MaxWidth, plan.TargetAcceptance, BlockedMomentAccumulator.BlockSize,
                "PLGH", "LOGW", "pair chain group");
            return new Group<TOps, TD, TB, PairWalk<TOps, TD, TB, TPotential>, PairWalkState<TD, TB>>(settings, new(plan),
                c => (RandomStream.ForChain(plan.Seed, plan.StreamOffset + c), plan.BetaOf(c), start(c)), work);
        }
    }

    /// <summary>
    /// One lane group of chains that draw a separation, on the lane engine: a walk (the pair walk, or the ring polymer of a
    /// path integral), the line recorder and the chains' records.
    /// </summary>
    internal sealed class Group<TOps, TD, TB, TWalk, TState>
        : LaneEngine<TOps, TD, TB, TWalk, TState, LineRecorder<TOps, TD, TB>, LineSums<TD>>
        where TOps : struct, ILaneOps<TD, TB>
        where TD : struct
        where TB : struct
        where TWalk : struct, ILaneWalk<TD, TState>
        where TState : struct
    {
        private readonly ChainRecord[] _records;
        private readonly Tally _tally;
        private readonly Func<int, (RandomStream Stream, double Beta, double Start)> _place;
        private LineRecorder<TOps, TD, TB> _recorder;
        private bool _hasRecorder;

        /// <param name="settings">The engine's settings (steps, widths, tags).</param>
        /// <param name="walk">The walk.</param>
        /// <param name="place">Chain c's stream, β and start.</param>
        /// <param name="work">The chains.</param>
        internal Group(EngineSettings settings, TWalk walk, Func<int, (RandomStream Stream, double Beta, double Start)> place, GroupWork work)
            : base(settings, walk, work)
        {
            _place = place;
            _records = Records;
            _tally = new Tally(_records, TOps.Count);
        }

        private protected override long Accepted(int lane) => (long)TOps.Get(Sums.Accepted, lane);

        private protected override void PlaceLane(int lane, int chain)
        {
            var (stream, beta, start) = _place(chain);
            Walk.Place(ref State, lane, stream, beta, start, 0, 0);
        }

        private protected override LineRecorder<TOps, TD, TB> Recorder(long done, int chunk)
        {
            // Built once and copied per chunk: a ladder cuts a chunk at every swap (measured, docs/performance.md).
            if (!_hasRecorder)
            {
                (_recorder, _hasRecorder) = (new(_tally, Waves, done, chunk), true);
                return _recorder;
            }
            return new(in _recorder, done, chunk);
        }

        private protected override void StartRecords() => Sums.BlockReference = Walk.Point(State).X;

        private protected override LaneTally Tally => _tally;

        private protected override void CloseBlock(int count)
        {
            Span<double> about = stackalloc double[_records[0].Cumulants.Size];
            for (int lane = 0; lane < _records.Length; lane++)
            {
                double reference = TOps.Get(Sums.BlockReference, lane), s1 = TOps.Get(Sums.S1, lane), s2 = TOps.Get(Sums.S2, lane);
                double s3 = TOps.Get(Sums.S3, lane), s4 = TOps.Get(Sums.S4, lane);
                _records[lane].AddSeparationBlock(count, reference, s1, s2, s3, s4);
                // The same sums about the record's fixed reference (binomial shift by δ = block reference − fixed reference), for the cumulants.
                double delta = reference - _records[lane].Layout.References[0], n = count;
                about[0] = n;
                about[1] = s1 + n * delta;
                about[2] = s2 + 2 * delta * s1 + delta * delta * n;
                about[3] = s3 + 3 * delta * s2 + 3 * delta * delta * s1 + delta * delta * delta * n;
                about[4] = s4 + 4 * delta * s3 + 6 * delta * delta * s2 + 4 * delta * delta * delta * s1 + delta * delta * delta * delta * n;
                Waves.CopyLane(lane, about[CumulantSums.SizeFor(1)..]);
                _records[lane].Cumulants.AddBlock(Step - count, about);
            }
            Waves.Clear();
            var zero = TOps.Broadcast(0.0);
            Sums.S1 = Sums.S2 = Sums.S3 = Sums.S4 = zero;
            Sums.BlockReference = Walk.Point(State).X;
        }

    }

    /// <summary>
    /// The pair walk: r' = r + w(2u₁ − 1 + 2^−52), rejected outside the window, accepted when u₂·J(r) &lt; J(r')·e^(−β(V(r') − V(r)))
    /// with J = 1 (line) or r² (radial).
    /// </summary>
    internal readonly struct PairWalk<TOps, TD, TB, TPotential> : ILaneWalk<TD, PairWalkState<TD, TB>>
        where TOps : struct, ILaneOps<TD, TB>
        where TD : struct
        where TB : struct
        where TPotential : struct, IPairPotential
    {
        private readonly TPotential _potential;
        private readonly double _lower, _upper;
        private readonly bool _radial;

        internal PairWalk(Plan<TPotential> plan)
        {
            _potential = plan.Potential;
            _lower = plan.Lower;
            _upper = plan.Upper;
            _radial = plan.Radial;
        }

        public void Start(ref PairWalkState<TD, TB> state)
        {
            var r = state.Position;
            var e = _potential.LaneEnergy<TOps, TD, TB>(r);
            var faults = LaneFaultCheck.None<TOps, TD, TB>();
            LaneFaultCheck.Note<TOps, TD, TB>(ref faults, r, e);
            LaneFaultCheck.ThrowIfAny<TOps, TD, TB, TPotential>(faults, _potential, static p => p.Description);
            state.Energy = e;
            state.Jacobian = _radial ? TOps.Multiply(r, r) : TOps.Broadcast(1.0);
        }

        public void Place(ref PairWalkState<TD, TB> state, int lane, in RandomStream stream, double beta, double x, double y, double z)
        {
            LaneSeeding.Load<TOps, TD, TB>(ref state.R0, ref state.R1, ref state.R2, ref state.R3, lane, stream);
            state.NegativeBeta = TOps.Set(state.NegativeBeta, lane, -beta);
            state.Position = TOps.Set(state.Position, lane, x);
        }

        public void StartRecording(ref PairWalkState<TD, TB> state)
        {
        }

        public void Complete(in PairWalkState<TD, TB> state, int lane, ChainRecord record)
        {
        }

        public void SaveOwn(StateWriter w)
        {
        }

        public void LoadOwn(StateReader r)
        {
        }

        public void ClearFaults(ref PairWalkState<TD, TB> state) => state.Faults = LaneFaultCheck.None<TOps, TD, TB>();

        public bool ReplaysFaults => false;

        public void ReadConfiguration(in PairWalkState<TD, TB> state, int lane, Span<double> values)
            => (values[0], values[1], values[2]) = (TOps.Get(state.Position, lane), TOps.Get(state.Energy, lane), TOps.Get(state.Jacobian, lane));

        public void WriteConfiguration(ref PairWalkState<TD, TB> state, int lane, ReadOnlySpan<double> values)
        {
            state.Position = TOps.Set(state.Position, lane, values[0]);
            state.Energy = TOps.Set(state.Energy, lane, values[1]);
            state.Jacobian = TOps.Set(state.Jacobian, lane, values[2]);
        }

        public void StreamState(in PairWalkState<TD, TB> state, int lane, Span<ulong> words)
            => (words[0], words[1], words[2], words[3]) = (TOps.GetBits(state.R0, lane), TOps.GetBits(state.R1, lane), TOps.GetBits(state.R2, lane), TOps.GetBits(state.R3, lane));

        public void ThrowIfFaulted(in PairWalkState<TD, TB> state, in PairWalkState<TD, TB> before, TD logWidthBefore, double[]? gains, TD width, int chunk)
            => LaneFaultCheck.ThrowIfAny<TOps, TD, TB, TPotential>(state.Faults, _potential, static p => p.Description);

        [MethodImpl(MethodImplOptions.AggressiveInlining)]
        public LanePoint<TD> Point(in PairWalkState<TD, TB> state) => new(state.Position, default, default, state.Energy);

        [MethodImpl(MethodImplOptions.AggressiveInlining)]
        public TD Step(ref PairWalkState<TD, TB> state, TD width)
        {
            var position = state.Position;
            var u1 = LaneMath.NextUnit<TOps, TD, TB>(ref state.R0, ref state.R1, ref state.R2, ref state.R3);
            var u2 = LaneMath.NextUnit<TOps, TD, TB>(ref state.R0, ref state.R1, ref state.R2, ref state.R3);
            // 2u − (1 − 2^−52): the 52-bit grid of u shifted half a cell, so the offsets are symmetric about 0 and so is the proposal.
            var proposal = TOps.MultiplyAdd(width, TOps.Subtract(TOps.Add(u1, u1), TOps.Broadcast(1.0 - 1.0 / 4503599627370496.0)), position);
            var inside = TOps.And(TOps.LessOrEqual(TOps.Broadcast(_lower), proposal), TOps.LessOrEqual(proposal, TOps.Broadcast(_upper)));
            var candidate = TOps.Select(inside, proposal, position); // outside lanes evaluate the current point and are rejected below
            var candidateEnergy = _potential.LaneEnergy<TOps, TD, TB>(candidate);
            LaneFaultCheck.Note<TOps, TD, TB>(ref state.Faults, candidate, candidateEnergy);
            var ratio = LaneMath.Exp<TOps, TD, TB>(TOps.Multiply(state.NegativeBeta, TOps.Subtract(candidateEnergy, state.Energy)));
            TD accept;
            if (_radial)
            {
                var candidateJacobian = TOps.Multiply(candidate, candidate);
                accept = TOps.And(inside, TOps.LessThan(TOps.Multiply(u2, state.Jacobian), TOps.Multiply(candidateJacobian, ratio)));
                state.Jacobian = TOps.Select(accept, candidateJacobian, state.Jacobian);
            }
            else
            {
                accept = TOps.And(inside, TOps.LessThan(u2, ratio));
            }
            state.Position = TOps.Select(accept, candidate, position);
            state.Energy = TOps.Select(accept, candidateEnergy, state.Energy);
            return accept;
        }
    }

    /// <summary>
    /// The line recorder: per draw, the acceptance count, the raw power sums about the position before the moment block
    /// (converted as <see cref="BlockedMomentAccumulator"/> does), the batch sums of x − ref and of V − V_ref
    /// (<see cref="BatchMeansStore"/>'s rule), the histogram count and, among the first draws of a chain, the draw itself.
    /// </summary>
    internal readonly struct LineRecorder<TOps, TD, TB> : ILaneRecorder<TD, LineSums<TD>>
        where TOps : struct, ILaneOps<TD, TB>
        where TD : struct
        where TB : struct
    {
        private readonly LaneTallyView<TOps, TD, TB> _tally;
        private readonly TD _batchReference, _binLower;
        private readonly LaneWaves<TOps, TD, TB> _waves;

        internal LineRecorder(Tally tally, LaneWaves<TOps, TD, TB> waves, long done, int chunk)
        {
            _waves = waves;
            _tally = new LaneTallyView<TOps, TD, TB>(tally, done, chunk);
            _batchReference = TOps.Broadcast(tally.BatchReference);
            _binLower = TOps.Broadcast(tally.BinLower);
        }

        /// <summary>The recorder <paramref name="template"/> (of the same group) for another chunk, its invariants copied.</summary>
        internal LineRecorder(in LineRecorder<TOps, TD, TB> template, long done, int chunk)
        {
            this = template;
            _tally = new LaneTallyView<TOps, TD, TB>(in template._tally, done, chunk);
        }

        [MethodImpl(MethodImplOptions.AggressiveInlining)]
        public void Add(ref LineSums<TD> sums, in LanePoint<TD> point, TD accept, int j)
        {
            sums.Accepted = TOps.Add(sums.Accepted, TOps.Select(accept, TOps.Broadcast(1.0), TOps.Broadcast(0.0)));
            var x = point.X;

            // Raw power sums about the position before the block.
            var d = TOps.Subtract(x, sums.BlockReference);
            var d2 = TOps.Multiply(d, d);
            sums.S1 = TOps.Add(sums.S1, d);
            sums.S2 = TOps.Add(sums.S2, d2);
            sums.S3 = TOps.Add(sums.S3, TOps.Multiply(d2, d));
            sums.S4 = TOps.Add(sums.S4, TOps.Multiply(d2, d2));

            // Batch sums of x − ref and (x − ref)², and of V − V_ref (what reweighting across temperatures needs).
            var b = TOps.Subtract(x, _batchReference);
            sums.B1 = TOps.Add(sums.B1, b);
            sums.B2 = TOps.Add(sums.B2, TOps.Multiply(b, b));
            if (_waves.Count != 0)
            {
                _waves.Add1(b); // the temperature factor's sums about the same reference
            }
            var de = TOps.Subtract(point.Energy, _tally.EnergyReference);
            sums.E1 = TOps.Add(sums.E1, de);
            sums.E2 = TOps.Add(sums.E2, TOps.Multiply(de, de));

            // Histograms (x is inside the window, so x − lower is in [0, width]), then the draw itself if kept.
            _tally.CountBin(TOps.Subtract(x, _binLower));
            _tally.CountEnergy(de);
            _tally.ReweightLine(j, de, b);
            _tally.Keep(j, 1, x, x, x);
        }

        public void OpenBatch(in LineSums<TD> sums, int lane, Span<double> values)
            => (values[0], values[1], values[2], values[3]) = (TOps.Get(sums.B1, lane), TOps.Get(sums.B2, lane), TOps.Get(sums.E1, lane), TOps.Get(sums.E2, lane));

        [MethodImpl(MethodImplOptions.AggressiveInlining)]
        public void CloseBatch(ref LineSums<TD> sums, int closed)
        {
            var batchSums = _tally.BatchSums;
            TOps.Store(sums.B1, ref batchSums[4 * closed * TOps.Count]);
            TOps.Store(sums.B2, ref batchSums[(4 * closed + 1) * TOps.Count]);
            TOps.Store(sums.E1, ref batchSums[(4 * closed + 2) * TOps.Count]);
            TOps.Store(sums.E2, ref batchSums[(4 * closed + 3) * TOps.Count]);
            var zero = TOps.Broadcast(0.0);
            sums.B1 = sums.B2 = sums.E1 = sums.E2 = zero;
        }
    }

    /// <summary>The line recorder's tally: the flat arrays of <see cref="LaneTally"/> and the line's references.</summary>
    internal sealed class Tally(ChainRecord[] records, int width) : LaneTally(records, width, batchValues: 4)
    {
        internal double BatchReference { get; } = records[0].Stores[0].Reference;

        internal double BinLower { get; } = records[0].Bins.Lower;
    }

    /// <summary>The pair walk's state in every lane: position, energy, Jacobian, −β, random stream and fault notes (saved
    /// word for word, field by field in this order, lanes within a field: docs/checkpoints.md).</summary>
    [StructLayout(LayoutKind.Sequential)]
    internal struct PairWalkState<TD, TB>
        where TD : struct
        where TB : struct
    {
        internal TD Position, Energy, Jacobian, NegativeBeta;
        internal TB R0, R1, R2, R3;
        internal LaneFaults<TD> Faults;
    }

    /// <summary>The line recorder's running sums in every lane: accepted proposals, the open moment block's power sums, the
    /// open batch's sums of x and V, and the moment block's reference (saved word for word in this order).</summary>
    [StructLayout(LayoutKind.Sequential)]
    internal struct LineSums<TD> where TD : struct
    {
        internal TD Accepted, S1, S2, S3, S4, B1, B2, E1, E2, BlockReference;
    }
}
