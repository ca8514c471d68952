using System;
using System.Globalization;
using System.Runtime.CompilerServices;
using System.Runtime.Intrinsics;
using System.Threading;
using ThermalSampling.Numerics;
using ThermalSampling.Persistence;
using ThermalSampling.Randomness;

namespace ThermalSampling.Sampling;

/// <summary>
/// The walk seam: a kind of Metropolis chain is its state in every lane and one step of it. Implemented by a struct,
/// so the engine's chunk loops are compiled once per walk and the step inlines into them with no call in the loop (a call
/// there would send every vector register to memory: they are all caller-saved). A step must make no calls either.
/// </summary>
/// <typeparam name="TD">Doubles, one per lane.</typeparam>
/// <typeparam name="TState">The walk's state in every lane: positions, energy, −β, random stream, fault notes (saved word for word).</typeparam>
internal interface ILaneWalk<TD, TState>
    where TD : struct
    where TState : struct
{
    /// <summary>One proposal and its acceptance test in every lane at proposal scale <paramref name="width"/>; returns the acceptance mask.</summary>
    TD Step(ref TState state, TD width);

    /// <summary>What the records see of the state after a step (the draw).</summary>
    LanePoint<TD> Point(in TState state);

    /// <summary>
    /// Puts a chain into lane <paramref name="lane"/>: its stream, its inverse temperature <paramref name="beta"/> (1/eV; one
    /// register may hold several temperatures) and its start (<paramref name="x"/>, <paramref name="y"/>, <paramref name="z"/>;
    /// a line uses x only).
    /// </summary>
    void Place(ref TState state, int lane, in RandomStream stream, double beta, double x, double y, double z);

    /// <summary>After every lane is placed: the starting energies, with their fault check.</summary>
    void Start(ref TState state);

    /// <summary>Burn-in is over: the walk clears its own recorded tallies (a ring's kinetic-energy sums) and starts them.</summary>
    void StartRecording(ref TState state);

    /// <summary>What the walk adds to lane <paramref name="lane"/>'s finished record (a ring's kinetic-energy sums; nothing for a one-point walk).</summary>
    void Complete(in TState state, int lane, ChainRecord record);

    /// <summary>Writes what the walk keeps outside <typeparamref name="TState"/> (a ring polymer's beads), nothing for a one-point walk.</summary>
    void SaveOwn(StateWriter w);

    /// <summary>Reads what <see cref="SaveOwn"/> wrote.</summary>
    void LoadOwn(StateReader r);

    /// <summary>Clears the fault notes before a chunk.</summary>
    void ClearFaults(ref TState state);

    /// <summary>
    /// Copies lane <paramref name="lane"/>'s configuration (its position, energy and anything that depends on the position
    /// alone, at most <see cref="LaneGroup.MaxConfiguration"/> values) into <paramref name="values"/>: what a replica swap
    /// moves between temperatures. The lane's stream, −β and fault notes stay.
    /// </summary>
    void ReadConfiguration(in TState state, int lane, Span<double> values);

    /// <summary>Puts a configuration read by <see cref="ReadConfiguration"/> into lane <paramref name="lane"/>.</summary>
    void WriteConfiguration(ref TState state, int lane, ReadOnlySpan<double> values);

    /// <summary>Lane <paramref name="lane"/>'s four generator words (where its chain's stream stands).</summary>
    void StreamState(in TState state, int lane, Span<ulong> words);

    /// <summary>
    /// Whether <see cref="ThrowIfFaulted"/> replays a faulted chunk from the state before it (to name the failing pair);
    /// only then does the engine copy the state before every chunk.
    /// </summary>
    bool ReplaysFaults { get; }

    /// <summary>
    /// Throws when the chunk just run (from <paramref name="before"/>, the state before it when <see cref="ReplaysFaults"/>,
    /// else default) noted a NaN or −∞ energy. <paramref name="gains"/> is set for a burn-in chunk (then the widths follow
    /// <paramref name="logWidthBefore"/>), null for a recorded chunk at <paramref name="width"/>.
    /// </summary>
    void ThrowIfFaulted(in TState state, in TState before, TD logWidthBefore, double[]? gains, TD width, int chunk);
}

/// <summary>
/// The record seam: what each recorded draw adds to the running sums of its chain (moments, batch sums, histograms,
/// counts), and where a batch's sums go when it closes. Implemented by a struct made for each chunk (it carries the
/// chunk's place in the run); like a walk's step, <see cref="Add"/> inlines and makes no calls.
/// </summary>
/// <typeparam name="TD">Doubles, one per lane.</typeparam>
/// <typeparam name="TSums">The running sums in every lane (saved word for word).</typeparam>
internal interface ILaneRecorder<TD, TSums>
    where TD : struct
    where TSums : struct
{
    /// <summary>Adds the <paramref name="j"/>-th draw of the chunk, <paramref name="point"/>, reached with acceptance mask <paramref name="accept"/>.</summary>
    void Add(ref TSums sums, in LanePoint<TD> point, TD accept, int j);

    /// <summary>The batch just filled is the <paramref name="closed"/>-th closed in this chunk: stores its sums for the records and clears them.</summary>
    void CloseBatch(ref TSums sums, int closed);

    /// <summary>Lane <paramref name="lane"/>'s open batch: its sums of each value and its square (each coordinate, then the energy) into <paramref name="values"/>.</summary>
    void OpenBatch(in TSums sums, int lane, Span<double> values);
}

/// <summary>A draw as the records see it: up to three coordinates (unused ones stay zero) and the potential energy, per lane.</summary>
/// <typeparam name="TD">Doubles, one per lane.</typeparam>
internal readonly struct LanePoint<TD>(TD x, TD y, TD z, TD energy) where TD : struct
{
    internal TD X { get; } = x;

    internal TD Y { get; } = y;

    internal TD Z { get; } = z;

    internal TD Energy { get; } = energy;
}

/// <summary>What a lane group's plan fixes for the engine: steps, the first and largest proposal widths, the target
/// acceptance, the moment block and the checkpoint tags.</summary>
internal readonly record struct EngineSettings(long BurnIn, long Samples, double InitialWidth, double MaxWidth, double TargetAcceptance, int BlockSize,
    string HeaderTag, string WidthTag, string What);

/// <summary>What a lane group is asked to do: its chains (from <see cref="FirstChain"/>; padding lanes at or beyond <see cref="End"/>
/// are dropped), how to make each chain's record and progress reporter, its checkpoints and cancellation.</summary>
internal sealed record GroupWork(int FirstChain, int End, Func<int, ChainRecord> Record, Func<int, ProgressReporter> Progress, GroupCheckpoints Checkpoints,
    int Group, CancellationToken Ct);

/// <summary>A kind of chain's fixed plan, which builds its lane group at whatever width the dispatcher picks.</summary>
internal interface ILanePlan
{
    /// <summary>Builds the group of lane width <typeparamref name="TOps"/> for <paramref name="work"/> (not yet placed or run).</summary>
    LaneGroup Build<TOps, TD, TB>(GroupWork work)
        where TOps : struct, ILaneOps<TD, TB>
        where TD : struct
        where TB : struct;
}

/// <summary>
/// A lane group seen from outside its width and walk: run it whole (<see cref="Run"/>), or open it, advance it in steps
/// and close it, with its lanes' configurations readable and writable between steps (what a temperature ladder's swaps
/// need; <see cref="TemperatureLadder"/>).
/// </summary>
internal abstract class LaneGroup : LaneGroupProgress
{
    /// <summary>The most values a walk's configuration holds.</summary>
    internal const int MaxConfiguration = 8;

    private protected LaneGroup(long burnIn, long samples, int width, int live)
        : base(burnIn, samples, width, live)
    {
    }

    /// <summary>Runs the group from its start or from its checkpointed state to the end and returns its chains' finished records.</summary>
    internal abstract ChainRecord[] Run();

    /// <summary>Places the chains, or continues from <paramref name="saved"/> (a state written by <see cref="IResumableGroup.Save"/>).</summary>
    internal abstract void Open(byte[]? saved);

    /// <summary>Steps every lane until <paramref name="total"/> steps (burn-in and recorded) are done; a step count already reached does nothing.</summary>
    internal abstract void AdvanceTo(long total);

    /// <summary>After the last step: the chains' finished records.</summary>
    internal abstract ChainRecord[] Close();

    /// <summary>Lane <paramref name="lane"/>'s current potential energy, eV.</summary>
    internal abstract double Energy(int lane);

    /// <summary>Lane <paramref name="lane"/>'s configuration (<see cref="ILaneWalk{TD, TState}.ReadConfiguration"/>).</summary>
    internal abstract void ReadConfiguration(int lane, Span<double> values);

    /// <summary>Sets lane <paramref name="lane"/>'s configuration.</summary>
    internal abstract void WriteConfiguration(int lane, ReadOnlySpan<double> values);

    /// <summary>Before <see cref="Open"/>: record no sums for reweighting across temperatures (<see cref="LaneTally.SkipReweighting"/>).</summary>
    internal abstract void SkipReweighting();
}

/// <summary>How chains are packed into lane groups, and any kind of chain's group run at a lane count chosen at run time.</summary>
internal static class LaneGroups
{
    /// <summary>The widest lane count worth using: a power of two no larger than the hardware's vector and no larger than the chains each thread gets.</summary>
    internal static int ChooseLanes(int chains, int threads, int? requested)
    {
        if (requested is int r)
        {
            return r;
        }
        int hardware = Vector512.IsHardwareAccelerated ? 8 : Vector256.IsHardwareAccelerated ? 4 : Vector128.IsHardwareAccelerated ? 2 : 1;
        int perThread = Math.Max(1, chains / Math.Max(1, threads));
        int lanes = 1;
        while (lanes * 2 <= Math.Min(hardware, perThread))
        {
            lanes *= 2;
        }
        return lanes;
    }


    /// <summary>Builds the group of <paramref name="work"/> for <paramref name="plan"/> at <paramref name="lanes"/> lanes per register.</summary>
    internal static LaneGroup Build<TPlan>(int lanes, TPlan plan, GroupWork work) where TPlan : ILanePlan
        => LaneWidths.Dispatch<Job<TPlan>, LaneGroup>(lanes, new(plan, work));

    private readonly record struct Job<TPlan>(TPlan Plan, GroupWork Work) : ILaneWidthJob<LaneGroup> where TPlan : ILanePlan
    {
        public LaneGroup Run<TOps, TD, TB>()
            where TOps : struct, ILaneOps<TD, TB>
            where TD : struct
            where TB : struct
            => Plan.Build<TOps, TD, TB>(Work);
    }
}

/// <summary>
/// The one lane engine: runs a group of chains, one per vector lane, through seeding, adaptive burn-in, the recorded
/// phase and the chunk boundaries between (checkpoints, progress, cancellation), and writes and reads its whole state.
/// A kind of chain is a walk (<typeparamref name="TWalk"/>, its state <typeparamref name="TState"/>), a recorder
/// (<typeparamref name="TRecorder"/>, its sums <typeparamref name="TSums"/>) and a subclass that places the chains in the
/// lanes and hands closed batches, moment blocks and the final tallies to the chains' records. The chunk loops are the
/// engine's own, written once (<see cref="AdaptLoop"/>, <see cref="RecordLoop"/>); the engine makes its calls once per
/// chunk of up to 4096 steps, never per step, so the loops keep the walk in registers and the engine costs nothing per step.
/// </summary>
/// <typeparam name="TOps">The lane width.</typeparam>
/// <typeparam name="TD">Doubles, one per lane.</typeparam>
/// <typeparam name="TB">Raw words, one per lane.</typeparam>
/// <typeparam name="TWalk">The walk.</typeparam>
/// <typeparam name="TState">The walk's running state in every lane.</typeparam>
/// <typeparam name="TRecorder">The recorder.</typeparam>
/// <typeparam name="TSums">The recorder's running sums in every lane.</typeparam>
internal abstract class LaneEngine<TOps, TD, TB, TWalk, TState, TRecorder, TSums> : LaneGroup
    where TOps : struct, ILaneOps<TD, TB>
    where TD : struct
    where TB : struct
    where TWalk : struct, ILaneWalk<TD, TState>
    where TState : struct
    where TRecorder : struct, ILaneRecorder<TD, TSums>
    where TSums : struct
{
    private const int ChunkSteps = LaneAdaptation.ChunkSteps;

    private readonly string _headerTag, _widthTag, _what;
    private readonly double _initialWidth, _maxWidth, _targetAcceptance;
    private readonly long _burnIn, _samples;
    private readonly int _blockSize;
    private readonly TWalk _walk;
    private TD _logWidth;
    private TD _recordWidth; // the recorded phase's widths, from _logWidth when first needed (_hasRecordWidth)
    private bool _hasRecordWidth;

    /// <summary>The walk in every lane; its layout is the checkpoint's WALK section.</summary>
    private protected TState State;

    /// <summary>The recorder's running sums in every lane; their layout is the checkpoint's SUMS section.</summary>
    private protected TSums Sums;

    /// <param name="settings">What the subclass's plan fixes: steps, widths, the moment block and the checkpoint tags.</param>
    /// <param name="walk">The walk (its fixed parameters).</param>
    /// <param name="work">The chains (lane 0 holds the first; lanes at or beyond the end repeat the last chain and are dropped), their records and progress.</param>
    private protected LaneEngine(EngineSettings settings, TWalk walk, GroupWork work)
        : base(settings.BurnIn, settings.Samples, TOps.Count, Math.Min(TOps.Count, work.End - work.FirstChain))
    {
        _work = work;
        Records = new ChainRecord[Live];
        Reporters = new ProgressReporter[Live];
        for (int lane = 0; lane < Live; lane++)
        {
            Records[lane] = work.Record(work.FirstChain + lane);
            Reporters[lane] = work.Progress(work.FirstChain + lane);
        }
        (_burnIn, _samples, _initialWidth, _maxWidth, _blockSize) = (settings.BurnIn, settings.Samples, settings.InitialWidth, settings.MaxWidth, settings.BlockSize);
        _targetAcceptance = settings.TargetAcceptance;
        (_headerTag, _widthTag, _what) = (settings.HeaderTag, settings.WidthTag, settings.What);
        _walk = walk;
        Waves = new LaneWaves<TOps, TD, TB>(Records[0].Layout);
    }

    /// <summary>The open moment block's temperature-factor sums (empty when no scattering vector was asked for).</summary>
    private protected LaneWaves<TOps, TD, TB> Waves { get; }


    private readonly GroupWork _work;

    /// <summary>The live lanes' chain records.</summary>
    private protected ChainRecord[] Records { get; }

    private protected ProgressReporter[] Reporters { get; }

    /// <summary>Lane <paramref name="lane"/>'s accepted proposals while recording (from the recorder's sums).</summary>
    private protected abstract long Accepted(int lane);

    /// <summary>What else lane <paramref name="lane"/>'s record takes from the sums at the end (counts beyond acceptance).</summary>
    private protected virtual void CompleteRecord(ChainRecord record, int lane)
    {
    }

    internal sealed override ChainRecord[] Run()
    {
        Open(_work.Checkpoints.SavedState(_work.Group));
        AdvanceTo(_burnIn + _samples);
        _work.Checkpoints.Finished(_work.Group, this);
        return Close();
    }

    internal sealed override double Energy(int lane) => TOps.Get(_walk.Point(State).Energy, lane);

    internal sealed override void SkipReweighting() => Tally.SkipReweighting();

    internal sealed override void ReadConfiguration(int lane, Span<double> values) => _walk.ReadConfiguration(State, lane, values);

    internal sealed override void WriteConfiguration(int lane, ReadOnlySpan<double> values) => _walk.WriteConfiguration(ref State, lane, values);

    /// <summary>Puts chain <paramref name="chain"/>'s stream, −β and start into lane <paramref name="lane"/> of <see cref="State"/>.</summary>
    private protected abstract void PlaceLane(int lane, int chain);

    /// <summary>The recorder for a recorded chunk of <paramref name="chunk"/> steps after <paramref name="done"/> recorded steps.</summary>
    private protected abstract TRecorder Recorder(long done, int chunk);

    /// <summary>Burn-in is over and <see cref="Sums"/> is cleared: what else the recorded phase starts from.</summary>
    private protected virtual void StartRecords()
    {
    }

    /// <summary>The group's flat arrays (histogram and energy counts, kept draws, closed batches' sums).</summary>
    private protected abstract LaneTally Tally { get; }

    /// <summary>Draws per batch of the records.</summary>
    private int BatchSize => Records[0].Stores[0].BatchSize;

    /// <summary>Hands the sums of the <paramref name="closed"/> batches closed since the last hand-over to the records: batch k's sums of value v (each coordinate, then the energy) at (2·V·k + 2v)·width.</summary>
    private void AddClosedBatches(int closed)
    {
        // Store by store, each store's batches in order: its arrays are written front to back in one run (which the
        // hardware prefetches), not sixteen stores a value at a time.
        var sums = Tally.BatchSums;
        for (int lane = 0; lane < Records.Length; lane++)
        {
            var stores = Records[lane].Stores;
            for (int v = 0; v < stores.Length; v++)
            {
                var store = stores[v];
                for (int k = 0; k < closed; k++)
                {
                    int at = (2 * stores.Length * k + 2 * v) * TOps.Count + lane;
                    store.AddBatchSums(sums[at], sums[at + TOps.Count]);
                }
            }
        }
    }

    /// <summary>A recorded chunk of <paramref name="chunk"/> steps after <paramref name="done"/> has run: bookkeeping the recorder left for outside the loop.</summary>
    private protected virtual void AfterChunk(long done, int chunk)
    {
    }

    /// <summary>Closes the open moment block of <paramref name="count"/> steps into the records and clears its sums.</summary>
    private protected abstract void CloseBlock(int count);

    /// <summary>Writes anything the group keeps beyond the records and the tally.</summary>
    private protected virtual void SaveExtra(StateWriter w)
    {
    }

    /// <summary>Reads what <see cref="SaveExtra"/> wrote.</summary>
    private protected virtual void LoadExtra(StateReader r)
    {
    }

    /// <summary>The walk (its fixed parameters).</summary>
    private protected TWalk Walk => _walk;

    /// <summary>
    /// One chunk of burn-in: step, then the Robbins–Monro width update, in every lane. A separate method with no calls
    /// inside, so that the JIT keeps the walk in registers; the walk's state is copied into a local for the loop.
    /// </summary>
    [MethodImpl(MethodImplOptions.NoInlining | MethodImplOptions.AggressiveOptimization)]
    private static TD AdaptLoop(TWalk walk, ref TState stateRef, TD logWidth, double[] gains, int chunk, double target, double maxWidth)
    {
        var state = stateRef;
        var logMax = TOps.Broadcast(Math.Log(maxWidth));
        for (int j = 0; j < chunk; j++)
        {
            var accept = walk.Step(ref state, LaneAdaptation.Width<TOps, TD, TB>(logWidth, maxWidth));
            logWidth = LaneAdaptation.Update<TOps, TD, TB>(logWidth, accept, target, gains[j], logMax);
        }
        stateRef = state;
        return logWidth;
    }

    /// <summary>
    /// One chunk of the recorded phase at the frozen <paramref name="width"/>: step, add the draw to the sums, close a
    /// batch every <paramref name="batchSize"/> draws (its sums left where the recorder keeps them, after the
    /// <paramref name="closed"/> batches already waiting there, which it counts up). Like <see cref="AdaptLoop"/>, a
    /// separate method with no calls inside.
    /// </summary>
    [MethodImpl(MethodImplOptions.NoInlining | MethodImplOptions.AggressiveOptimization)]
    private static void RecordLoop(TWalk walk, TRecorder recorder, ref TState stateRef, ref TSums sumsRef, TD width, int chunk, ref int inBatch, int batchSize,
        ref int closed)
    {
        var state = stateRef;
        var sums = sumsRef;
        int filled = inBatch, waiting = closed;
        for (int j = 0; j < chunk; j++)
        {
            var accept = walk.Step(ref state, width);
            recorder.Add(ref sums, walk.Point(state), accept, j);
            if (++filled == batchSize)
            {
                recorder.CloseBatch(ref sums, waiting);
                waiting++;
                filled = 0;
            }
        }
        stateRef = state;
        sumsRef = sums;
        inBatch = filled;
        closed = waiting;
    }

    private ChunkBoundary? _boundary;
    private double[]? _gains;
    private int _waitingBatches; // closed batches left in the tally since the last 4096-step boundary (none at a boundary, so none in a checkpoint)

    internal sealed override void Open(byte[]? saved)
    {
        if (saved is null)
        {
            for (int lane = 0; lane < TOps.Count; lane++)
            {
                PlaceLane(lane, Math.Min(_work.FirstChain + lane, _work.End - 1)); // padding lanes repeat the last chain and are dropped
            }
            _walk.Start(ref State);
            _logWidth = TOps.Broadcast(Math.Log(_initialWidth));
        }
        else
        {
            Load(new StateReader(saved, _what + " " + _work.Group.ToString(CultureInfo.InvariantCulture)));
        }
        _boundary = new ChunkBoundary(Reporters, _work.Checkpoints, _work.Group, this, _work.Ct);
    }

    /// <summary>
    /// Burn-in, then the recorded phase, up to <paramref name="total"/> steps in all. Chunks end where they would in one
    /// whole run and also at <paramref name="total"/>; cutting a chunk changes no bit (the gains, the batches, the blocks,
    /// the kept draws and the distribution counts follow the step index, not the chunk).
    /// </summary>
    internal sealed override void AdvanceTo(long total)
    {
        var boundary = _boundary ?? throw new InvalidOperationException("The group is advanced before it is opened.");
        if (Phase == GroupPhase.BurnIn)
        {
            BurnIn(boundary, Math.Min(total, _burnIn));
            if (Step < _burnIn)
            {
                return;
            }
            StartRecording();
            Sums = default;
            Waves.Clear();
            StartRecords();
            _walk.StartRecording(ref State);
        }
        if (Phase == GroupPhase.Recording)
        {
            if (!_hasRecordWidth)
            {
                // Frozen for the recorded phase: worked out once, not at every call (a ladder calls at every swap).
                (_recordWidth, _hasRecordWidth) = (LaneAdaptation.Width<TOps, TD, TB>(_logWidth, _maxWidth), true);
            }
            Record(_recordWidth, boundary, Math.Min(total - _burnIn, _samples));
            if (Step == _samples)
            {
                Phase = GroupPhase.Finished;
            }
        }
    }

    internal sealed override ChainRecord[] Close()
    {
        Tally.CopyTo(Records, _samples);
        var recorder = Recorder(_samples, 0);
        Span<double> open = stackalloc double[2 * Records[0].Stores.Length];
        for (int lane = 0; lane < Live; lane++)
        {
            recorder.OpenBatch(Sums, lane, open);
            for (int v = 0; v < Records[lane].Stores.Length; v++)
            {
                Records[lane].Stores[v].SetOpenBatch(InBatch, open[2 * v], open[2 * v + 1]);
            }
        }
        foreach (var reporter in Reporters)
        {
            reporter.Finish();
        }
        var width = LaneAdaptation.Width<TOps, TD, TB>(_logWidth, _maxWidth);
        Span<ulong> words = stackalloc ulong[4];
        for (int lane = 0; lane < Live; lane++)
        {
            var record = Records[lane];
            (record.Proposals, record.Accepted, record.ProposalScale) = (_samples, Accepted(lane), TOps.Get(width, lane));
            CompleteRecord(record, lane);
            _walk.Complete(State, lane, record);
            _walk.StreamState(State, lane, words);
            record.SetStreamState(words);
        }
        return Records;
    }

    /// <summary>Burn-in chunks (ending at every 4096th step and at <paramref name="end"/>) until step <paramref name="end"/>.</summary>
    private void BurnIn(ChunkBoundary boundary, long end)
    {
        var gains = _gains ??= new double[ChunkSteps];
        while (Step < end)
        {
            if ((Step & (ChunkSteps - 1)) == 0)
            {
                boundary.Reached(Step);
            }
            int chunk = (int)Math.Min(ChunkSteps - (Step & (ChunkSteps - 1)), end - Step);
            LaneAdaptation.FillGains(gains, Step, chunk);
            _walk.ClearFaults(ref State);
            var before = _walk.ReplaysFaults ? State : default;
            var logWidthBefore = _logWidth;
            _logWidth = AdaptLoop(_walk, ref State, _logWidth, gains, chunk, _targetAcceptance, _maxWidth);
            _walk.ThrowIfFaulted(State, before, logWidthBefore, gains, default, chunk);
            Step += chunk;
        }
    }

    /// <summary>
    /// The recorded phase up to recorded step <paramref name="end"/>: chunks end at moment-block and progress boundaries
    /// (every 4096 steps) and at <paramref name="end"/>, where the bookkeeping that makes calls happens; batches close inside the chunk.
    /// </summary>
    private void Record(TD width, ChunkBoundary boundary, long end)
    {
        int batchSize = BatchSize;
        while (Step < end)
        {
            if ((Step & (ChunkSteps - 1)) == 0)
            {
                boundary.Reached(_burnIn + Step);
            }
            int chunk = (int)Math.Min(_blockSize - InBlock, Math.Min(end - Step, ChunkSteps - (Step & (ChunkSteps - 1))));
            _walk.ClearFaults(ref State);
            var before = _walk.ReplaysFaults ? State : default;
            RecordLoop(_walk, Recorder(Step, chunk), ref State, ref Sums, width, chunk, ref InBatch, batchSize, ref _waitingBatches);
            _walk.ThrowIfFaulted(State, before, default, null, width, chunk);
            AfterChunk(Step, chunk);
            Step += chunk;
            if ((Step & (ChunkSteps - 1)) == 0 || Step == _samples)
            {
                // Closed batches go to the records once per 4096 steps, however finely a ladder cuts the chunks: handed
                // over a few at a time, the stores of every rung's chains are written in short interleaved runs that
                // miss the cache (measured: twice the cost of a line step; docs/performance.md).
                AddClosedBatches(_waitingBatches);
                _waitingBatches = 0;
            }
            InBlock += chunk;
            if (InBlock == _blockSize || Step == _samples)
            {
                CloseBlock(InBlock);
                InBlock = 0;
            }
        }
    }

    public sealed override void Save(StateWriter w)
    {
        SaveProgress(w, _headerTag);
        LaneWalkWords.Save(w, "WALK", ref State);
        LaneWalkWords.Save(w, "SUMS", ref Sums);
        w.Words(_widthTag, LaneWalkWords.Lanes<TOps, TD, TB>(_logWidth));
        foreach (var record in Records)
        {
            record.Save(w);
        }
        Tally.Save(w, RecordedSteps);
        Waves.Save(w);
        SaveExtra(w);
        _walk.SaveOwn(w);
    }

    private void Load(StateReader r)
    {
        LoadProgress(r, _headerTag, BatchSize);
        LaneWalkWords.Load(r, "WALK", ref State);
        LaneWalkWords.Load(r, "SUMS", ref Sums);
        _logWidth = LaneWalkWords.FromLanes<TOps, TD, TB>(r.Words(_widthTag, TOps.Count));
        _hasRecordWidth = false;
        foreach (var record in Records)
        {
            record.Load(r);
        }
        Tally.Load(r, RecordedSteps);
        Waves.Load(r);
        LoadExtra(r);
        _walk.LoadOwn(r);
        r.End();
    }
}
