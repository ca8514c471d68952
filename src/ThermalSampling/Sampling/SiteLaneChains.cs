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
    private const int BlockSize = 4096;

    /// <summary>Everything fixed for a run.</summary>
    internal sealed record Plan<TPotential>(TPotential Potential, double[] Sites, Position Centre, Confinement Confinement, Position Minimum,
        double L00, double L10, double L11, double L20, double L21, double L22, double Beta, double InitialScale, double TargetAcceptance,
        double MaxScale, double WallBand, long BurnIn, long Samples, ulong Seed, string Description, BasinGrid Basin, double[]? ChainBetas = null,
        TPotential[]? GroupPotentials = null, int[]? GroupEnds = null, PolynomialField? Field = null)
        : ISiteFrame where TPotential : struct, IPairPotential
    {
        /// <summary>Each run of sites' potential (one run of every site when the landscape has one species).</summary>
        internal TPotential[] Potentials => GroupPotentials ?? [Potential];

        /// <summary>The end of each run's sites in <see cref="Sites"/> (3 per site).</summary>
        internal int[] Ends => GroupEnds ?? [Sites.Length];

        /// <summary>The inverse temperature of chain <paramref name="chain"/> (<see cref="ChainBetas"/> when the chains' temperatures differ), 1/eV.</summary>
        internal double BetaOf(int chain) => ChainBetas?[chain] ?? Beta;
    }

    /// <summary>Per chain: its stream advanced past the start-point draws, and the start.</summary>
    internal delegate (RandomStream Stream, Position Start) ChainStart(int chain);

    /// <summary>The group of chains <paramref name="firstChain"/> … firstChain + lanes − 1 (those at or beyond <paramref name="end"/> are computed and dropped),
    /// from the start or from the group's checkpointed state.</summary>
    internal static LaneGroup Build<TPotential>(int lanes, Plan<TPotential> plan, int firstChain, int end, ChainStart start, Func<int, ChainRecord> record,
        Func<int, ProgressReporter> progress, GroupCheckpoints checkpoints, int group, CancellationToken ct)
        where TPotential : struct, IPairPotential
        => LaneGroups.Build(lanes, new Starts<TPotential>(plan, start), new GroupWork(firstChain, end, record, progress, checkpoints, group, ct));

    /// <summary>The plan and the chains' starts: what builds a site group at any width.</summary>
    private readonly record struct Starts<TPotential>(Plan<TPotential> Plan, ChainStart Start) : ILanePlan where TPotential : struct, IPairPotential
    {
        public LaneGroup Build<TOps, TD, TB>(GroupWork work)
            where TOps : struct, ILaneOps<TD, TB>
            where TD : struct
            where TB : struct
        {
            var plan = Plan;
            var start = Start;
            return new Group<TOps, TD, TB, SiteWalk<TOps, TD, TB, TPotential>, SiteWalkState<TD, TB>>(Settings(plan), new(plan), plan, c =>
            {
                var (stream, p) = start(c);
                return (stream, plan.BetaOf(c), p);
            }, work);
        }
    }

    /// <summary>
    /// Like <see cref="Build{TPotential}"/>, with each chain a ring polymer of <paramref name="ring"/>'s beads (the path-integral
    /// walk), whose whole-ring translation starts at <paramref name="initialWidth"/> Å per coordinate and stays below <paramref name="maxWidth"/>.
    /// </summary>
    internal static LaneGroup BuildRing<TPotential>(int lanes, Plan<TPotential> plan, RingPlan ring, double initialWidth, double maxWidth, int firstChain, int end,
        ChainStart start, Func<int, ChainRecord> record, Func<int, ProgressReporter> progress, GroupCheckpoints checkpoints, int group, CancellationToken ct)
        where TPotential : struct, IPairPotential
        => LaneGroups.Build(lanes, new RingStarts<TPotential>(plan, ring, initialWidth, maxWidth, start), new GroupWork(firstChain, end, record, progress, checkpoints, group, ct));

    /// <summary>The plan, the ring and the chains' starts: what builds a group of ring polymers in a site at any width.</summary>
    private readonly record struct RingStarts<TPotential>(Plan<TPotential> Plan, RingPlan Ring, double InitialWidth, double MaxWidth, ChainStart Start) : ILanePlan
        where TPotential : struct, IPairPotential
    {
        public LaneGroup Build<TOps, TD, TB>(GroupWork work)
            where TOps : struct, ILaneOps<TD, TB>
            where TD : struct
            where TB : struct
        {
            var plan = Plan;
            var start = Start;
            var settings = new EngineSettings(plan.BurnIn, plan.Samples, InitialWidth, MaxWidth, plan.TargetAcceptance, BlockSize, "RSGH", "LOGR", "site ring-polymer group");
            var field = new SiteField<TOps, TD, TB, TPotential>(plan.Potentials, plan.Ends, plan.Sites, plan.Confinement, plan.Centre, plan.Field);
            return new Group<TOps, TD, TB, RingWalk<TOps, TD, TB, SiteField<TOps, TD, TB, TPotential>>, RingState<TD, TB>>(settings,
                new(field, Ring.Beads, Ring.Segment, Ring.HbarSquaredOverMass, Ring.Moves), plan, c =>
                {
                    var (stream, p) = start(c);
                    return (stream, plan.BetaOf(c), p);
                }, work);
        }
    }

    /// <summary>What a site plan fixes for the engine.</summary>
    internal static EngineSettings Settings<TPotential>(Plan<TPotential> plan) where TPotential : struct, IPairPotential
        => new(plan.BurnIn, plan.Samples, plan.InitialScale, plan.MaxScale, plan.TargetAcceptance, BlockSize, "SLGH", "LOGS", "site chain group");

    /// <summary>The site frame a group's records need: the minimum, the confinement and its centre, the wall band and the basin.</summary>
    internal interface ISiteFrame
    {
        /// <summary>The harmonic minimum, Å.</summary>
        Position Minimum { get; }

        /// <summary>The confinement.</summary>
        Confinement Confinement { get; }

        /// <summary>The confinement's centre, Å.</summary>
        Position Centre { get; }

        /// <summary>The width of the band inside the wall where draws count as near it, Å.</summary>
        double WallBand { get; }

        /// <summary>The basin grid.</summary>
        BasinGrid Basin { get; }
    }

    /// <summary>
    /// One lane group of chains that draw a point in space, on the lane engine: a walk (the site walk, or the ring polymer
    /// of a path integral), the site recorder and the chains' records.
    /// </summary>
    internal sealed class Group<TOps, TD, TB, TWalk, TState>
        : LaneEngine<TOps, TD, TB, TWalk, TState, SiteRecorder<TOps, TD, TB>, SiteSums<TD>>
        where TOps : struct, ILaneOps<TD, TB>
        where TD : struct
        where TB : struct
        where TWalk : struct, ILaneWalk<TD, TState>
        where TState : struct
    {
        private readonly ISiteFrame _plan;
        private readonly ChainRecord[] _records;
        private readonly SiteTally _tally;
        private readonly Func<int, (RandomStream Stream, double Beta, Position Start)> _place;
        private readonly TD[] _shapeDraws = new TD[3 * (LaneAdaptation.ChunkSteps / ShapeFrame.LaneStride + 1)];
        private readonly LaneShape<TOps, TD, TB> _shape;
        private SiteRecorder<TOps, TD, TB> _recorder;
        private bool _hasRecorder;

        internal Group(EngineSettings settings, TWalk walk, ISiteFrame frame, Func<int, (RandomStream Stream, double Beta, Position Start)> place, GroupWork work)
            : base(settings, walk, work)
        {
            _plan = frame;
            _place = place;
            _records = Records;
            _tally = new SiteTally(_records, TOps.Count, frame.Basin, frame.Minimum, frame.Confinement, frame.Centre, frame.WallBand);
            _shape = new LaneShape<TOps, TD, TB>(_tally.Frame, _tally.ShapeCounts, _tally.Lanes);
        }

        private protected override long Accepted(int lane) => (long)TOps.Get(Sums.Accepted, lane);

        private protected override void CompleteRecord(ChainRecord record, int lane)
        {
            int labels = _tally.Basin.LabelCount;
            if (_tally.BasinSums.Length > 0)
            {
                int block = labels * EnergyBinSums.Groups * ChainRecord.BasinSumValues;
                record.BasinSums = _tally.BasinSums.AsSpan(lane * block, block).ToArray();
            }
            record.CountBasinDraws(labels); // with no sums, no point of the confinement lies outside the site's basin: nothing was looked up
            record.DrawsNearWall = (long)TOps.Get(Sums.NearWall, lane);
            int slots = _tally.Frame.Slots;
            record.Shape!.AddCounts(_tally.ShapeCounts.AsSpan(lane * slots, slots));
        }

        private protected override void PlaceLane(int lane, int chain)
        {
            var (stream, beta, p) = _place(chain);
            Walk.Place(ref State, lane, stream, beta, p.X, p.Y, p.Z);
        }

        private protected override SiteRecorder<TOps, TD, TB> Recorder(long done, int chunk)
        {
            // Built once and copied per chunk: a ladder cuts a chunk at every swap (measured, docs/performance.md).
            if (!_hasRecorder)
            {
                (_recorder, _hasRecorder) = (new(_tally, Waves, _shapeDraws, done, chunk), true);
                return _recorder;
            }
            return new(in _recorder, done, chunk);
        }

        /// <summary>The draws the recorder kept for the distribution counts (every LaneStride-th of a chunk), counted here.</summary>
        private protected override void AfterChunk(long done, int chunk)
        {
            if (SiteTally.MomentsOnlyForBenchmarks)
            {
                return;
            }
            ref readonly var shape = ref _shape;
            int phase = (int)(done & (ShapeFrame.LaneStride - 1));
            for (int j = (ShapeFrame.LaneStride - phase) & (ShapeFrame.LaneStride - 1); j < chunk; j += ShapeFrame.LaneStride)
            {
                int at = 3 * ((j + phase) / ShapeFrame.LaneStride);
                shape.Count(_shapeDraws[at], _shapeDraws[at + 1], _shapeDraws[at + 2], _tally.Index);
            }
        }

        private protected override void StartRecords()
        {
            Array.Clear(_tally.BasinSums);
            Array.Clear(_tally.ShapeCounts);
        }

        private protected override LaneTally Tally => _tally;

        private protected override void CloseBlock(int count)
        {
            var minimum = _plan.Minimum;
            ref var s = ref Sums;
            Span<double> block = stackalloc double[_records[0].Cumulants.Size];
            var higher = s.Higher;
            for (int lane = 0; lane < _records.Length; lane++)
            {
                _records[lane].AddPositionBlock(CovarianceAccumulator.FromRawSums(count, minimum.X, minimum.Y, minimum.Z,
                    TOps.Get(s.X, lane), TOps.Get(s.Y, lane), TOps.Get(s.Z, lane), TOps.Get(s.XX, lane), TOps.Get(s.YY, lane), TOps.Get(s.ZZ, lane),
                    TOps.Get(s.XY, lane), TOps.Get(s.XZ, lane), TOps.Get(s.YZ, lane)));
                // The block's raw sums about the minimum in the cumulants' order: count, x y z, xx xy xz yy yz zz, then the
                // ten third-order and fifteen fourth-order sums.
                block[0] = count;
                (block[1], block[2], block[3]) = (TOps.Get(s.X, lane), TOps.Get(s.Y, lane), TOps.Get(s.Z, lane));
                (block[4], block[5], block[6]) = (TOps.Get(s.XX, lane), TOps.Get(s.XY, lane), TOps.Get(s.XZ, lane));
                (block[7], block[8], block[9]) = (TOps.Get(s.YY, lane), TOps.Get(s.YZ, lane), TOps.Get(s.ZZ, lane));
                for (int k = 0; k < 25; k++)
                {
                    block[10 + k] = TOps.Get(LaneHigherSums.At(ref higher, k), lane);
                }
                Waves.CopyLane(lane, block[CumulantSums.SizeFor(3)..]);
                _records[lane].Cumulants.AddBlock(Step - count, block);
            }
            Waves.Clear();
            s.Higher = default;
            var zero = TOps.Broadcast(0.0);
            s.X = s.Y = s.Z = s.XX = s.YY = s.ZZ = s.XY = s.XZ = s.YZ = zero;
        }

        private protected override void SaveExtra(StateWriter w)
        {
            w.Doubles("BASS", _tally.BasinSums);
            w.Longs("SHPL", _tally.ShapeCounts);
        }

        private protected override void LoadExtra(StateReader r)
        {
            r.DoublesInto("BASS", _tally.BasinSums);
            r.Longs("SHPL", _tally.ShapeCounts.Length).CopyTo(_tally.ShapeCounts, 0);
        }
    }

    /// <summary>
    /// A site's distribution counts in every lane, <see cref="ShapeFrame.Slots3"/>'s arithmetic: the displacement from the
    /// frame's centre projected on its three axes, each marginal's slot (below, N bins, above) clamped in the vector, the
    /// radial distance's slot, and the projection's cell (⌊i⌋·side + ⌊j⌋ formed in the words by a shift, side a power of
    /// two), with one slot for outside it. Only the five increments are per lane.
    /// </summary>
    internal readonly struct LaneShape<TOps, TD, TB>
        where TOps : struct, ILaneOps<TD, TB>
        where TD : struct
        where TB : struct
    {
        private readonly TD _cx, _cy, _cz, _e00, _e01, _e02, _e10, _e11, _e12, _e20, _e21, _e22;
        private readonly TD _l0, _l1, _l2, _s0, _s1, _s2, _radialScale, _p0, _p1, _last, _bins, _side;
        private readonly TB _o0, _o1, _o2, _oRadial, _oProjection;
        private readonly int _shift, _lanes;
        private readonly long[] _counts;

        internal LaneShape(ShapeFrame frame, long[] counts, int lanes)
        {
            (_counts, _lanes, _shift) = (counts, lanes, frame.SideShift);
            (_cx, _cy, _cz) = (TOps.Broadcast(frame.Centre.X), TOps.Broadcast(frame.Centre.Y), TOps.Broadcast(frame.Centre.Z));
            var a = frame.Axes;
            (_e00, _e01, _e02) = (TOps.Broadcast(a[0].X), TOps.Broadcast(a[0].Y), TOps.Broadcast(a[0].Z));
            (_e10, _e11, _e12) = (TOps.Broadcast(a[1].X), TOps.Broadcast(a[1].Y), TOps.Broadcast(a[1].Z));
            (_e20, _e21, _e22) = (TOps.Broadcast(a[2].X), TOps.Broadcast(a[2].Y), TOps.Broadcast(a[2].Z));
            var w = frame.HalfWidths;
            (_l0, _l1, _l2) = (TOps.Broadcast(w[0]), TOps.Broadcast(w[1]), TOps.Broadcast(w[2]));
            (_s0, _s1, _s2) = (TOps.Broadcast(frame.Bins / (2 * w[0])), TOps.Broadcast(frame.Bins / (2 * w[1])), TOps.Broadcast(frame.Bins / (2 * w[2])));
            _radialScale = TOps.Broadcast(frame.Bins / frame.RadialUpper);
            (_p0, _p1) = (TOps.Broadcast(frame.Side / (2 * w[0])), TOps.Broadcast(frame.Side / (2 * w[1])));
            (_last, _bins, _side) = (TOps.Broadcast(frame.Bins + 1), TOps.Broadcast(frame.Bins), TOps.Broadcast(frame.Side));
            int slots = frame.Slots;
            _o0 = LaneCounting.Offsets<TOps, TD, TB>(slots, lanes);
            _o1 = TOps.AddBits(_o0, TOps.BroadcastBits((ulong)frame.MarginalBase(1)));
            _o2 = TOps.AddBits(_o0, TOps.BroadcastBits((ulong)frame.MarginalBase(2)));
            _oRadial = TOps.AddBits(_o0, TOps.BroadcastBits((ulong)frame.RadialBase));
            _oProjection = TOps.AddBits(_o0, TOps.BroadcastBits((ulong)frame.ProjectionBase));
        }

        [MethodImpl(MethodImplOptions.AggressiveInlining)]
        internal void Count(TD x, TD y, TD z, ulong[] index)
        {
            var dx = TOps.Subtract(x, _cx);
            var dy = TOps.Subtract(y, _cy);
            var dz = TOps.Subtract(z, _cz);
            var a0 = TOps.MultiplyAdd(_e02, dz, TOps.MultiplyAdd(_e01, dy, TOps.Multiply(_e00, dx)));
            var a1 = TOps.MultiplyAdd(_e12, dz, TOps.MultiplyAdd(_e11, dy, TOps.Multiply(_e10, dx)));
            var a2 = TOps.MultiplyAdd(_e22, dz, TOps.MultiplyAdd(_e21, dy, TOps.Multiply(_e20, dx)));
            var a0l = TOps.Add(a0, _l0);
            var a1l = TOps.Add(a1, _l1);
            LaneCounting.Count<TOps, TD, TB>(Marginal(a0l, _s0), _o0, index, _counts, _lanes);
            LaneCounting.Count<TOps, TD, TB>(Marginal(a1l, _s1), _o1, index, _counts, _lanes);
            LaneCounting.Count<TOps, TD, TB>(Marginal(TOps.Add(a2, _l2), _s2), _o2, index, _counts, _lanes);
            var r = TOps.Sqrt(TOps.MultiplyAdd(dz, dz, TOps.MultiplyAdd(dy, dy, TOps.Multiply(dx, dx))));
            var tr = TOps.Multiply(r, _radialScale);
            LaneCounting.Count<TOps, TD, TB>(TOps.Select(TOps.LessThan(tr, _bins), tr, _bins), _oRadial, index, _counts, _lanes);
            var i = TOps.Multiply(a0l, _p0);
            var j = TOps.Multiply(a1l, _p1);
            var zero = TOps.Broadcast(0.0);
            var inside = TOps.And(TOps.And(TOps.LessOrEqual(zero, i), TOps.LessThan(i, _side)), TOps.And(TOps.LessOrEqual(zero, j), TOps.LessThan(j, _side)));
            // Outside: i = side, j = 0 gives side², the slot after the cells.
            var cell = TOps.AddBits(TOps.ShiftLeft(TOps.Truncate(TOps.Select(inside, i, _side)), _shift), TOps.Truncate(TOps.Select(inside, j, zero)));
            LaneCounting.CountSlots<TOps, TD, TB>(TOps.AddBits(cell, _oProjection), index, _counts, _lanes);
        }

        /// <summary>The marginal slot t = (a + w)·scale + 1 clamped to [0, N + 1]: 0 below the range, N + 1 above.</summary>
        [MethodImpl(MethodImplOptions.AggressiveInlining)]
        private TD Marginal(TD aPlusHalfWidth, TD scale)
        {
            var t = TOps.MultiplyAdd(aPlusHalfWidth, scale, TOps.Broadcast(1.0));
            t = TOps.Select(TOps.LessThan(t, TOps.Broadcast(0.0)), TOps.Broadcast(0.0), t);
            return TOps.Select(TOps.LessThan(t, _last), t, _last);
        }
    }

    /// <summary>The confinement test (<see cref="Confinement.Contains"/>'s arithmetic) and the wall band, in every lane, without a square root.</summary>
    internal readonly struct LaneConfinement<TOps, TD, TB>
        where TOps : struct, ILaneOps<TD, TB>
        where TD : struct
        where TB : struct
    {
        private readonly double _size, _innerEdge, _cx, _cy, _cz;
        private readonly bool _sphere;

        internal LaneConfinement(Confinement confinement, Position centre, double wallBand)
        {
            _size = confinement.SizeInAngstroms;
            _innerEdge = Math.Max(_size - wallBand, 0); // |d| beyond this is within the band of the wall
            _sphere = confinement.Shape == ConfinementShape.Sphere;
            (_cx, _cy, _cz) = (centre.X, centre.Y, centre.Z);
        }

        /// <summary>Whether (x, y, z) is inside, and in <paramref name="nearWall"/> whether it lies within the wall band.</summary>
        [MethodImpl(MethodImplOptions.AggressiveInlining)]
        internal TD Inside(TD x, TD y, TD z, out TD nearWall)
        {
            var dx = TOps.Subtract(x, TOps.Broadcast(_cx));
            var dy = TOps.Subtract(y, TOps.Broadcast(_cy));
            var dz = TOps.Subtract(z, TOps.Broadcast(_cz));
            if (_sphere)
            {
                var r2 = TOps.Add(TOps.Add(TOps.Multiply(dx, dx), TOps.Multiply(dy, dy)), TOps.Multiply(dz, dz));
                nearWall = TOps.GreaterThan(r2, TOps.Broadcast(_innerEdge * _innerEdge));
                return TOps.LessOrEqual(r2, TOps.Broadcast(_size * _size));
            }
            var ax = TOps.Abs(dx);
            var ay = TOps.Abs(dy);
            var az = TOps.Abs(dz);
            var largest = TOps.Select(TOps.LessThan(ax, ay), ay, ax);
            largest = TOps.Select(TOps.LessThan(largest, az), az, largest);
            nearWall = TOps.GreaterThan(largest, TOps.Broadcast(_innerEdge));
            return TOps.LessOrEqual(largest, TOps.Broadcast(_size));
        }
    }

    /// <summary>
    /// The site walk: p' = p + s·L·v with v uniform in (−1, 1)³ on a symmetric grid and L the Cholesky factor of the
    /// harmonic covariance; rejected outside the confinement; accepted when u₄ &lt; e^(−β(V(p') − V(p))).
    /// </summary>
    internal readonly struct SiteWalk<TOps, TD, TB, TPotential> : ILaneWalk<TD, SiteWalkState<TD, TB>>
        where TOps : struct, ILaneOps<TD, TB>
        where TD : struct
        where TB : struct
        where TPotential : struct, IPairPotential
    {
        private readonly Plan<TPotential> _plan;
        private readonly TPotential[] _potentials;
        private readonly int[] _ends;
        private readonly double[] _sites;
        private readonly LaneConfinement<TOps, TD, TB> _confinement;
        private readonly LaneField<TOps, TD, TB> _field;

        internal SiteWalk(Plan<TPotential> plan)
        {
            _plan = plan;
            _potentials = plan.Potentials;
            _ends = plan.Ends;
            _sites = plan.Sites;
            _confinement = new LaneConfinement<TOps, TD, TB>(plan.Confinement, plan.Centre, plan.WallBand);
            _field = new LaneField<TOps, TD, TB>(plan.Field);
        }

        /// <summary>Σ_sites V(|p − site|²) in every lane, summed site by site in the landscape's order, one potential per run of sites of a species; plus the landscape's field, when it has one.</summary>
        [MethodImpl(MethodImplOptions.AggressiveInlining)]
        private TD Energy(TD x, TD y, TD z)
        {
            var e = SiteSums.Energy<TOps, TD, TB, TPotential>(_potentials, _ends, _sites, x, y, z);
            return _field.IsEmpty ? e : TOps.Add(e, _field.Value(x, y, z));
        }

        public void Start(ref SiteWalkState<TD, TB> state)
        {
            var e = Energy(state.X, state.Y, state.Z);
            var faults = LaneFaultCheck.None<TOps, TD, TB>();
            LaneFaultCheck.Note<TOps, TD, TB>(ref faults, TOps.Broadcast(0.0), e);
            if (!TOps.AllTrue(faults.AllFinite))
            {
                ThrowAt(faults, state.X, state.Y, state.Z);
            }
            state.Energy = e;
        }

        public void Place(ref SiteWalkState<TD, TB> state, int lane, in RandomStream stream, double beta, double x, double y, double z)
        {
            LaneSeeding.Load<TOps, TD, TB>(ref state.R0, ref state.R1, ref state.R2, ref state.R3, lane, stream);
            state.NegativeBeta = TOps.Set(state.NegativeBeta, lane, -beta);
            state.X = TOps.Set(state.X, lane, x);
            state.Y = TOps.Set(state.Y, lane, y);
            state.Z = TOps.Set(state.Z, lane, z);
        }

        public void StartRecording(ref SiteWalkState<TD, TB> state)
        {
        }

        public void Complete(in SiteWalkState<TD, TB> state, int lane, ChainRecord record)
        {
        }

        public void SaveOwn(StateWriter w)
        {
        }

        public void LoadOwn(StateReader r)
        {
        }

        public void ClearFaults(ref SiteWalkState<TD, TB> state) => state.Faults = LaneFaultCheck.None<TOps, TD, TB>();

        public bool ReplaysFaults => true;

        public void ReadConfiguration(in SiteWalkState<TD, TB> state, int lane, Span<double> values)
            => (values[0], values[1], values[2], values[3]) = (TOps.Get(state.X, lane), TOps.Get(state.Y, lane), TOps.Get(state.Z, lane), TOps.Get(state.Energy, lane));

        public void WriteConfiguration(ref SiteWalkState<TD, TB> state, int lane, ReadOnlySpan<double> values)
        {
            state.X = TOps.Set(state.X, lane, values[0]);
            state.Y = TOps.Set(state.Y, lane, values[1]);
            state.Z = TOps.Set(state.Z, lane, values[2]);
            state.Energy = TOps.Set(state.Energy, lane, values[3]);
        }

        public void StreamState(in SiteWalkState<TD, TB> state, int lane, Span<ulong> words)
            => (words[0], words[1], words[2], words[3]) = (TOps.GetBits(state.R0, lane), TOps.GetBits(state.R1, lane), TOps.GetBits(state.R2, lane), TOps.GetBits(state.R3, lane));

        [MethodImpl(MethodImplOptions.AggressiveInlining)]
        public LanePoint<TD> Point(in SiteWalkState<TD, TB> state) => new(state.X, state.Y, state.Z, state.Energy);

        [MethodImpl(MethodImplOptions.AggressiveInlining)]
        public TD Step(ref SiteWalkState<TD, TB> state, TD width) => Step(ref state, width, out _, out _, out _);

        /// <summary>
        /// One step in every lane; returns the acceptance mask and the point whose energy was evaluated (the proposal, or the
        /// current point where the proposal left the confinement), which only the fault replay reads.
        /// </summary>
        [MethodImpl(MethodImplOptions.AggressiveInlining)]
        private TD Step(ref SiteWalkState<TD, TB> state, TD scale, out TD evaluatedX, out TD evaluatedY, out TD evaluatedZ)
        {
            TD x = state.X, y = state.Y, z = state.Z;
            var a = TOps.Multiply(scale, LaneMath.NextOffsetPair<TOps, TD, TB>(ref state.R0, ref state.R1, ref state.R2, ref state.R3, out var bUnit));
            var b = TOps.Multiply(scale, bUnit);
            var c = TOps.Multiply(scale, LaneMath.NextOffsetPair<TOps, TD, TB>(ref state.R0, ref state.R1, ref state.R2, ref state.R3, out _));
            var u = LaneMath.NextUnit<TOps, TD, TB>(ref state.R0, ref state.R1, ref state.R2, ref state.R3);
            var px = TOps.MultiplyAdd(TOps.Broadcast(_plan.L00), a, x);
            var py = TOps.MultiplyAdd(TOps.Broadcast(_plan.L11), b, TOps.MultiplyAdd(TOps.Broadcast(_plan.L10), a, y));
            var pz = TOps.MultiplyAdd(TOps.Broadcast(_plan.L22), c, TOps.MultiplyAdd(TOps.Broadcast(_plan.L21), b, TOps.MultiplyAdd(TOps.Broadcast(_plan.L20), a, z)));
            var inside = _confinement.Inside(px, py, pz, out _);
            // Outside lanes evaluate the current point and are rejected below.
            px = TOps.Select(inside, px, x);
            py = TOps.Select(inside, py, y);
            pz = TOps.Select(inside, pz, z);
            (evaluatedX, evaluatedY, evaluatedZ) = (px, py, pz);
            var candidate = Energy(px, py, pz);
            LaneFaultCheck.Note<TOps, TD, TB>(ref state.Faults, TOps.Broadcast(0.0), candidate);
            var ratio = LaneMath.Exp<TOps, TD, TB>(TOps.Multiply(state.NegativeBeta, TOps.Subtract(candidate, state.Energy)));
            var accept = TOps.And(inside, TOps.LessThan(u, ratio));
            state.X = TOps.Select(accept, px, x);
            state.Y = TOps.Select(accept, py, y);
            state.Z = TOps.Select(accept, pz, z);
            state.Energy = TOps.Select(accept, candidate, state.Energy);
            return accept;
        }

        /// <summary>
        /// Throws for a chunk that noted a NaN or −∞ energy. The chunk loops keep no per-lane fault position (registers are
        /// scarce there), so the chunk is replayed step by step from the state before it (<paramref name="before"/>; with the
        /// burn-in's widths and gains when <paramref name="gains"/> is set, else at the frozen <paramref name="width"/>) until
        /// the first step that faults, and the error names the separation of the pair that failed at the point evaluated
        /// there. Only this error path pays for the replay.
        /// </summary>
        public void ThrowIfFaulted(in SiteWalkState<TD, TB> state, in SiteWalkState<TD, TB> before, TD logWidthBefore, double[]? gains, TD width, int chunk)
        {
            if (TOps.AllTrue(state.Faults.AllFinite))
            {
                return;
            }
            var replay = before;
            var logScale = logWidthBefore;
            var logMax = TOps.Broadcast(Math.Log(_plan.MaxScale));
            for (int j = 0; j < chunk; j++)
            {
                replay.Faults = LaneFaultCheck.None<TOps, TD, TB>();
                var scale = gains is null ? width : LaneAdaptation.Width<TOps, TD, TB>(logScale, _plan.MaxScale);
                var accept = Step(ref replay, scale, out var ex, out var ey, out var ez);
                if (!TOps.AllTrue(replay.Faults.AllFinite))
                {
                    ThrowAt(replay.Faults, ex, ey, ez);
                }
                if (gains is not null)
                {
                    logScale = LaneAdaptation.Update<TOps, TD, TB>(logScale, accept, _plan.TargetAcceptance, gains[j], logMax);
                }
            }
            // Not reproduced (a potential whose value changes between calls): the noted energy, with no separation.
            int lane = LaneFaultCheck.FirstFaultedLane<TOps, TD, TB>(state.Faults);
            throw new NonFiniteEnergyException(double.NaN, TOps.Get(state.Faults.Energy, lane), _plan.Description);
        }

        /// <summary>Throws for the first faulted lane of <paramref name="faults"/>, naming the separation of the pair that failed at that lane's point.</summary>
        private void ThrowAt(in LaneFaults<TD> faults, TD x, TD y, TD z)
        {
            int lane = LaneFaultCheck.FirstFaultedLane<TOps, TD, TB>(faults);
            double separation = SitePairs.OffendingSeparation(_potentials, _ends, _sites, TOps.Get(x, lane), TOps.Get(y, lane), TOps.Get(z, lane));
            throw new NonFiniteEnergyException(separation, TOps.Get(faults.Energy, lane), _plan.Description);
        }
    }

    /// <summary>
    /// The site recorder: per draw, the acceptance and near-wall counts, the covariance block sums and the batch sums per
    /// axis of the deviation from the harmonic minimum, the batch sums of V − V_min, the radial histogram count, the
    /// basin membership (only when the confinement reaches outside the basin) and, among the first draws, the draw itself.
    /// </summary>
    internal readonly struct SiteRecorder<TOps, TD, TB> : ILaneRecorder<TD, SiteSums<TD>>
        where TOps : struct, ILaneOps<TD, TB>
        where TD : struct
        where TB : struct
    {
        private readonly LaneTallyView<TOps, TD, TB> _tally;
        private readonly LaneConfinement<TOps, TD, TB> _confinement;
        private readonly TD _minX, _minY, _minZ, _gridX0, _gridY0, _gridZ0, _gridScale, _gridN;
        private readonly double[] _basinSums;
        private readonly int _labelCount;
        private readonly byte[] _outsideMask;
        private readonly bool _countOutside, _momentsOnly;
        private readonly int _shapePhase;
        private readonly LaneWaves<TOps, TD, TB> _waves;
        private readonly TD[] _shapeDraws;

        internal SiteRecorder(SiteTally tally, LaneWaves<TOps, TD, TB> waves, TD[] shapeDraws, long done, int chunk)
        {
            _waves = waves;
            _shapeDraws = shapeDraws;
            _momentsOnly = SiteTally.MomentsOnlyForBenchmarks;
            _shapePhase = (int)(done & (ShapeFrame.LaneStride - 1));
            _tally = new LaneTallyView<TOps, TD, TB>(tally, done, chunk);
            _confinement = new LaneConfinement<TOps, TD, TB>(tally.Confinement.Confinement, tally.Confinement.Centre, tally.Confinement.WallBand);
            var minimum = tally.Minimum;
            (_minX, _minY, _minZ) = (TOps.Broadcast(minimum.X), TOps.Broadcast(minimum.Y), TOps.Broadcast(minimum.Z));
            var grid = tally.Basin;
            _outsideMask = grid.Labels;
            _basinSums = tally.BasinSums;
            _labelCount = grid.LabelCount;
            _countOutside = grid.AnyOutside;
            (_gridX0, _gridY0, _gridZ0) = (TOps.Broadcast(grid.X0), TOps.Broadcast(grid.Y0), TOps.Broadcast(grid.Z0));
            _gridScale = TOps.Broadcast(1 / grid.Spacing);
            _gridN = TOps.Broadcast(grid.N);
        }

        /// <summary>The recorder <paramref name="template"/> (of the same group) for another chunk, its invariants copied.</summary>
        internal SiteRecorder(in SiteRecorder<TOps, TD, TB> template, long done, int chunk)
        {
            this = template;
            _shapePhase = (int)(done & (ShapeFrame.LaneStride - 1));
            _tally = new LaneTallyView<TOps, TD, TB>(in template._tally, done, chunk);
        }

        [MethodImpl(MethodImplOptions.AggressiveInlining)]
        public void Add(ref SiteSums<TD> s, in LanePoint<TD> point, TD accept, int j)
        {
            var one = TOps.Broadcast(1.0);
            var zero = TOps.Broadcast(0.0);
            s.Accepted = TOps.Add(s.Accepted, TOps.Select(accept, one, zero));

            // Deviations from the harmonic minimum (within the confinement, so small): the covariance block sums (converted
            // by CovarianceAccumulator.FromRawSums) and the batch sums per axis (BatchMeansStore's rule) share them.
            var mx = TOps.Subtract(point.X, _minX);
            var my = TOps.Subtract(point.Y, _minY);
            var mz = TOps.Subtract(point.Z, _minZ);
            s.X = TOps.Add(s.X, mx);
            s.Y = TOps.Add(s.Y, my);
            s.Z = TOps.Add(s.Z, mz);
            s.XX = TOps.MultiplyAdd(mx, mx, s.XX);
            s.YY = TOps.MultiplyAdd(my, my, s.YY);
            s.ZZ = TOps.MultiplyAdd(mz, mz, s.ZZ);
            s.XY = TOps.MultiplyAdd(mx, my, s.XY);
            s.XZ = TOps.MultiplyAdd(mx, mz, s.XZ);
            s.YZ = TOps.MultiplyAdd(my, mz, s.YZ);
            s.BX = TOps.Add(s.BX, mx);
            s.BY = TOps.Add(s.BY, my);
            s.BZ = TOps.Add(s.BZ, mz);
            var xx = TOps.Multiply(mx, mx);
            var yy = TOps.Multiply(my, my);
            var zz = TOps.Multiply(mz, mz);
            s.BXX = TOps.Add(s.BXX, xx);
            s.BYY = TOps.Add(s.BYY, yy);
            s.BZZ = TOps.Add(s.BZZ, zz);
            if (!_momentsOnly)
            {
                AddHigher(ref s.Higher, mx, my, mz, xx, yy, zz);
                if (((j + _shapePhase) & (ShapeFrame.LaneStride - 1)) == 0)
                {
                    // Every LaneStride-th draw is kept for the distribution counts, made after the loop (SiteLaneChains.Group.AfterChunk):
                    // five scattered increments inside it cost more than their share (register pressure on the whole step).
                    int at = 3 * ((j + _shapePhase) / ShapeFrame.LaneStride);
                    _shapeDraws[at] = point.X;
                    _shapeDraws[at + 1] = point.Y;
                    _shapeDraws[at + 2] = point.Z;
                }
            }
            if (_waves.Count != 0)
            {
                _waves.Add3(mx, my, mz); // the temperature factor's sums about the minimum
            }
            var de = TOps.Subtract(point.Energy, _tally.EnergyReference); // the same batches of V − V_min (what reweighting needs)
            s.BE = TOps.Add(s.BE, de);
            s.BEE = TOps.Add(s.BEE, TOps.Multiply(de, de));

            // The near-wall fraction (within the band of the wall), the radial histogram about the minimum, the energy's.
            _confinement.Inside(point.X, point.Y, point.Z, out var near);
            s.NearWall = TOps.Add(s.NearWall, TOps.Select(near, one, zero));
            _tally.CountBin(TOps.Sqrt(TOps.Add(TOps.Add(TOps.Multiply(mx, mx), TOps.Multiply(my, my)), TOps.Multiply(mz, mz))));
            _tally.CountEnergy(de);
            if (!_momentsOnly)
            {
                _tally.ReweightSite(j, de, mx, my, mz);
            }

            // Basin membership by the nearest point of the basin grid, only when the confinement reaches outside the basin
            // (a loop-invariant branch): i = round((x − x0)/h) by adding and removing 2^52 (exact for 0 ≤ t < 2^51), the
            // flat index (k·N + j)·N + i formed in the vector, one byte looked up per lane.
            if (_countOutside)
            {
                var roundShift = TOps.Broadcast(4503599627370496.0); // 2^52
                var gi = TOps.Subtract(TOps.MultiplyAdd(TOps.Subtract(point.X, _gridX0), _gridScale, roundShift), roundShift);
                var gj = TOps.Subtract(TOps.MultiplyAdd(TOps.Subtract(point.Y, _gridY0), _gridScale, roundShift), roundShift);
                var gk = TOps.Subtract(TOps.MultiplyAdd(TOps.Subtract(point.Z, _gridZ0), _gridScale, roundShift), roundShift);
                var flat = TOps.MultiplyAdd(TOps.MultiplyAdd(gk, _gridN, gj), _gridN, gi);
                var index = _tally.Index;
                TOps.StoreBits(TOps.Truncate(flat), ref index[0]);
                var labels = _outsideMask;
                // Each basin's draws and sums of the displacement and its products, per group of draws (the per-basin
                // mean and covariance, with a jackknife over the groups): the displacements leave the vector once.
                var scratch = _tally.Scratch;
                int n = TOps.Count, group = _tally.GroupAt(j);
                TOps.Store(mx, ref scratch[0]);
                TOps.Store(my, ref scratch[n]);
                TOps.Store(mz, ref scratch[2 * n]);
                var basinSums = _basinSums;
                for (int lane = 0; lane < _tally.Lanes; lane++)
                {
                    int label = labels[index[lane]];
                    int at = ((lane * _labelCount + label) * EnergyBinSums.Groups + group) * ChainRecord.BasinSumValues;
                    double x = scratch[lane], y = scratch[n + lane], z = scratch[2 * n + lane];
                    basinSums[at]++;
                    basinSums[at + 1] += x;
                    basinSums[at + 2] += y;
                    basinSums[at + 3] += z;
                    basinSums[at + 4] += x * x;
                    basinSums[at + 5] += y * y;
                    basinSums[at + 6] += z * z;
                    basinSums[at + 7] += x * y;
                    basinSums[at + 8] += x * z;
                    basinSums[at + 9] += y * z;
                }
            }
            _tally.Keep(j, 3, point.X, point.Y, point.Z);
        }

        public void OpenBatch(in SiteSums<TD> s, int lane, Span<double> values)
        {
            (values[0], values[1], values[2], values[3]) = (TOps.Get(s.BX, lane), TOps.Get(s.BXX, lane), TOps.Get(s.BY, lane), TOps.Get(s.BYY, lane));
            (values[4], values[5], values[6], values[7]) = (TOps.Get(s.BZ, lane), TOps.Get(s.BZZ, lane), TOps.Get(s.BE, lane), TOps.Get(s.BEE, lane));
        }

        /// <summary>The third- and fourth-order products of the displacement (m) into the open block's sums.</summary>
        [MethodImpl(MethodImplOptions.AggressiveInlining)]
        private static void AddHigher(ref LaneHigherSums<TD> h, TD mx, TD my, TD mz, TD xx, TD yy, TD zz)
        {
            var xy = TOps.Multiply(mx, my);
            var xz = TOps.Multiply(mx, mz);
            var yz = TOps.Multiply(my, mz);
            h.T111 = TOps.MultiplyAdd(xx, mx, h.T111);
            h.T112 = TOps.MultiplyAdd(xx, my, h.T112);
            h.T113 = TOps.MultiplyAdd(xx, mz, h.T113);
            h.T122 = TOps.MultiplyAdd(yy, mx, h.T122);
            h.T123 = TOps.MultiplyAdd(xy, mz, h.T123);
            h.T133 = TOps.MultiplyAdd(zz, mx, h.T133);
            h.T222 = TOps.MultiplyAdd(yy, my, h.T222);
            h.T223 = TOps.MultiplyAdd(yy, mz, h.T223);
            h.T233 = TOps.MultiplyAdd(zz, my, h.T233);
            h.T333 = TOps.MultiplyAdd(zz, mz, h.T333);
            h.F1111 = TOps.MultiplyAdd(xx, xx, h.F1111);
            h.F1112 = TOps.MultiplyAdd(xx, xy, h.F1112);
            h.F1113 = TOps.MultiplyAdd(xx, xz, h.F1113);
            h.F1122 = TOps.MultiplyAdd(xx, yy, h.F1122);
            h.F1123 = TOps.MultiplyAdd(xx, yz, h.F1123);
            h.F1133 = TOps.MultiplyAdd(xx, zz, h.F1133);
            h.F1222 = TOps.MultiplyAdd(xy, yy, h.F1222);
            h.F1223 = TOps.MultiplyAdd(xy, yz, h.F1223);
            h.F1233 = TOps.MultiplyAdd(xy, zz, h.F1233);
            h.F1333 = TOps.MultiplyAdd(xz, zz, h.F1333);
            h.F2222 = TOps.MultiplyAdd(yy, yy, h.F2222);
            h.F2223 = TOps.MultiplyAdd(yy, yz, h.F2223);
            h.F2233 = TOps.MultiplyAdd(yy, zz, h.F2233);
            h.F2333 = TOps.MultiplyAdd(yz, zz, h.F2333);
            h.F3333 = TOps.MultiplyAdd(zz, zz, h.F3333);
        }

        [MethodImpl(MethodImplOptions.AggressiveInlining)]
        public void CloseBatch(ref SiteSums<TD> s, int closed)
        {
            var batchSums = _tally.BatchSums;
            int at = 8 * closed * TOps.Count;
            TOps.Store(s.BX, ref batchSums[at]);
            TOps.Store(s.BXX, ref batchSums[at + TOps.Count]);
            TOps.Store(s.BY, ref batchSums[at + 2 * TOps.Count]);
            TOps.Store(s.BYY, ref batchSums[at + 3 * TOps.Count]);
            TOps.Store(s.BZ, ref batchSums[at + 4 * TOps.Count]);
            TOps.Store(s.BZZ, ref batchSums[at + 5 * TOps.Count]);
            TOps.Store(s.BE, ref batchSums[at + 6 * TOps.Count]);
            TOps.Store(s.BEE, ref batchSums[at + 7 * TOps.Count]);
            var zero = TOps.Broadcast(0.0);
            s.BX = s.BY = s.BZ = s.BXX = s.BYY = s.BZZ = s.BE = s.BEE = zero;
        }
    }

    /// <summary>Histogram counts, batch sums and retained draws of a lane group, in flat arrays the inner loop reaches without calls.</summary>
    internal sealed class SiteTally(ChainRecord[] records, int width, BasinGrid basin, Position minimum, Confinement confinement, Position centre, double wallBand)
        : LaneTally(records, width, batchValues: 8)
    {
        /// <summary>The harmonic minimum the deviations are taken from.</summary>
        internal Position Minimum { get; } = minimum;

        /// <summary>The site's basin map, for the membership test of every draw.</summary>
        internal BasinGrid Basin { get; } = basin;

        /// <summary>
        /// Per lane, basin label and group of draws, <see cref="ChainRecord.BasinSumValues"/> sums (<see cref="ChainRecord.BasinSums"/>'s
        /// layout, the draws first: the draws per basin come from them), lane-major; empty when the map has one basin.
        /// </summary>
        internal double[] BasinSums { get; } = new double[basin.AnyOutside ? records.Length * basin.LabelCount * EnergyBinSums.Groups * ChainRecord.BasinSumValues : 0];

        /// <summary>The confinement and wall band, for the near-wall count.</summary>
        internal (Confinement Confinement, Position Centre, double WallBand) Confinement { get; } = (confinement, centre, wallBand);

        /// <summary>Where the distribution counts are taken.</summary>
        internal ShapeFrame Frame { get; } = records[0].Layout.Shape!;

        /// <summary>The distribution counts, lane-major (<see cref="ShapeFrame.Slots"/> per live lane).</summary>
        internal long[] ShapeCounts { get; } = new long[records.Length * records[0].Layout.Shape!.Slots];

        /// <summary>
        /// For the benchmarks' same-run baseline only: record the moments and nothing of higher order (no third- and
        /// fourth-order sums, no distribution counts), the recorder as it was before those existed. Never set by the library.
        /// </summary>
        internal static bool MomentsOnlyForBenchmarks { get; set; }
    }
}

// Stryker disable all : vector-lane kernel, in no mutation mode (eng/mutation-testing.sh); LaneKernelTests checks it bit for bit
/// <summary>
/// A <see cref="PolynomialField"/> in every lane: the powers of the displacement from its centre (kept in a scratch array
/// the walk owns), then Σ c·u_x^a u_y^b u_z^c term by term in the fit's order (the same bits at every width).
/// </summary>
internal readonly struct LaneField<TOps, TD, TB>
    where TOps : struct, ILaneOps<TD, TB>
    where TD : struct
    where TB : struct
{
    private readonly int[] _a = [], _b = [], _c = [];
    private readonly double[] _coefficients = [];
    private readonly double _cx, _cy, _cz;
    private readonly int _degree;
    private readonly TD[] _powers = [];

    internal LaneField(PolynomialField? field)
    {
        if (field is null)
        {
            return;
        }
        (_a, _b, _c, _coefficients) = field.Terms;
        (_cx, _cy, _cz) = (field.Centre.X, field.Centre.Y, field.Centre.Z);
        _degree = field.Degree;
        _powers = new TD[3 * (_degree + 1)];
    }

    internal bool IsEmpty => _coefficients.Length == 0;

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    internal TD Value(TD x, TD y, TD z)
    {
        var p = _powers;
        int n = _degree + 1;
        var one = TOps.Broadcast(1.0);
        var ux = TOps.Subtract(x, TOps.Broadcast(_cx));
        var uy = TOps.Subtract(y, TOps.Broadcast(_cy));
        var uz = TOps.Subtract(z, TOps.Broadcast(_cz));
        (p[0], p[n], p[2 * n]) = (one, one, one);
        for (int k = 1; k < n; k++)
        {
            p[k] = TOps.Multiply(p[k - 1], ux);
            p[n + k] = TOps.Multiply(p[n + k - 1], uy);
            p[2 * n + k] = TOps.Multiply(p[2 * n + k - 1], uz);
        }
        var sum = TOps.Broadcast(0.0);
        for (int t = 0; t < _coefficients.Length; t++)
        {
            sum = TOps.MultiplyAdd(TOps.Multiply(TOps.Broadcast(_coefficients[t]), p[_a[t]]), TOps.Multiply(p[n + _b[t]], p[2 * n + _c[t]]), sum);
        }
        return sum;
    }
}

/// <summary>The site energy in every lane, shared by the site walk and the ring's site field.</summary>
internal static class SiteSums
{
    /// <summary>Σ_sites V(|p − site|²), one potential per run of sites (<paramref name="ends"/>: each run's end in <paramref name="sites"/>, 3 per site): the potential is loaded once per run, so a species costs no call per neighbour.</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    internal static TD Energy<TOps, TD, TB, TPotential>(TPotential[] potentials, int[] ends, double[] sites, TD x, TD y, TD z)
        where TOps : struct, ILaneOps<TD, TB>
        where TD : struct
        where TB : struct
        where TPotential : struct, IPairPotential
    {
        var e = TOps.Broadcast(0.0);
        int i = 0;
        for (int g = 0; g < ends.Length; g++)
        {
            var potential = potentials[g];
            for (int end = ends[g]; i < end; i += 3)
            {
                var dx = TOps.Subtract(x, TOps.Broadcast(sites[i]));
                var dy = TOps.Subtract(y, TOps.Broadcast(sites[i + 1]));
                var dz = TOps.Subtract(z, TOps.Broadcast(sites[i + 2]));
                var r2 = TOps.Add(TOps.Add(TOps.Multiply(dx, dx), TOps.Multiply(dy, dy)), TOps.Multiply(dz, dz));
                e = TOps.Add(e, potential.LaneEnergyAtSquaredDistance<TOps, TD, TB>(r2));
            }
        }
        return e;
    }
}

/// <summary>The site walk's state in every lane: position, energy, −β, random stream and fault notes (saved word for word in this order).</summary>
/// <typeparam name="TD">The lane type.</typeparam>
/// <typeparam name="TB">The lane word type.</typeparam>
[StructLayout(LayoutKind.Sequential)]
internal struct SiteWalkState<TD, TB>
    where TD : struct
    where TB : struct
{
    internal TD X, Y, Z, Energy, NegativeBeta;
    internal TB R0, R1, R2, R3;
    internal LaneFaults<TD> Faults;
}

// Stryker disable all : vector-lane kernel, in no mutation mode (eng/mutation-testing.sh); LaneKernelTests checks it bit for bit
/// <summary>
/// The site recorder's running sums in every lane: accepted proposals, draws near the wall, the open moment block's sums
/// of deviations and their products, and the open batch's sums per axis and of the energy (saved word for word in this order).
/// </summary>
/// <typeparam name="TD">The lane type.</typeparam>
[StructLayout(LayoutKind.Sequential)]
internal struct SiteSums<TD> where TD : struct
{
    internal TD Accepted, NearWall, X, Y, Z, XX, YY, ZZ, XY, XZ, YZ, BX, BY, BZ, BXX, BYY, BZZ, BE, BEE;
    internal LaneHigherSums<TD> Higher;
}

// Stryker disable all : vector-lane kernel, in no mutation mode (eng/mutation-testing.sh); LaneKernelTests checks it bit for bit
/// <summary>The open moment block's third- and fourth-order sums of the displacement from the minimum, per lane, in the cumulants' order.</summary>
/// <typeparam name="TD">The lane type.</typeparam>
[StructLayout(LayoutKind.Sequential)]
internal struct LaneHigherSums<TD> where TD : struct
{
    internal TD T111, T112, T113, T122, T123, T133, T222, T223, T233, T333;
    internal TD F1111, F1112, F1113, F1122, F1123, F1133, F1222, F1223, F1233, F1333, F2222, F2223, F2233, F2333, F3333;
}

/// <summary>Access to <see cref="LaneHigherSums{TD}"/> by index (outside the inner loop).</summary>
internal static class LaneHigherSums
{
    /// <summary>The <paramref name="k"/>-th sum (0–9 third order, 10–24 fourth).</summary>
    internal static ref TD At<TD>(ref LaneHigherSums<TD> sums, int k) where TD : struct
        => ref Unsafe.Add(ref sums.T111, k);
}
