using System;
using System.Globalization;
using System.Threading;
using ThermalSampling.Numerics;
using ThermalSampling.Persistence;
using ThermalSampling.Randomness;

namespace ThermalSampling.Sampling;

/// <summary>
/// The one lane engine: runs a group of chains, one per vector lane, through seeding, adaptive burn-in, the recorded
/// phase and the chunk boundaries between (checkpoints, progress, cancellation), and writes and reads its whole state.
/// A kind of chain is a subclass that supplies its walk state <typeparamref name="TState"/> (saved word for word), its two
/// call-free chunk kernels and what its records do with a chunk's sums. The engine calls the subclass once per chunk of
/// up to 4096 steps, never per step, so the kernels keep the walk in registers and the engine costs nothing per step.
/// </summary>
/// <typeparam name="TOps">The lane width.</typeparam>
/// <typeparam name="TD">Doubles, one per lane.</typeparam>
/// <typeparam name="TB">Raw words, one per lane.</typeparam>
/// <typeparam name="TState">The walk's running state in every lane (positions, energies, random streams, open sums, faults).</typeparam>
internal abstract class LaneEngine<TOps, TD, TB, TState> : LaneGroupProgress
    where TOps : struct, ILaneOps<TD, TB>
    where TD : struct
    where TB : struct
    where TState : struct
{
    private const int ChunkSteps = LaneAdaptation.ChunkSteps;

    private readonly string _headerTag, _widthTag, _what;
    private readonly double _initialWidth, _maxWidth;
    private readonly long _burnIn, _samples;
    private readonly int _blockSize;
    private TD _logWidth;

    /// <summary>The walk in every lane; its layout is the checkpoint's WALK section.</summary>
    private protected TState State;

    /// <param name="settings">What the subclass's plan fixes: steps, widths, the moment block and the checkpoint tags.</param>
    /// <param name="firstChain">The chain in lane 0.</param>
    /// <param name="chains">The run's chain count (lanes at or beyond it repeat the last chain and are dropped).</param>
    /// <param name="reporters">Progress per live lane.</param>
    private protected LaneEngine(EngineSettings settings, int firstChain, int chains, ProgressReporter[] reporters)
        : base(settings.BurnIn, settings.Samples, TOps.Count, Math.Min(TOps.Count, chains - firstChain))
    {
        (_burnIn, _samples, _initialWidth, _maxWidth, _blockSize) = (settings.BurnIn, settings.Samples, settings.InitialWidth, settings.MaxWidth, settings.BlockSize);
        (_headerTag, _widthTag, _what) = (settings.HeaderTag, settings.WidthTag, settings.What);
        FirstChain = firstChain;
        Chains = chains;
        Reporters = reporters;
    }

    /// <summary>What a lane group's plan fixes for the engine.</summary>
    internal readonly record struct EngineSettings(long BurnIn, long Samples, double InitialWidth, double MaxWidth, int BlockSize,
        string HeaderTag, string WidthTag, string What);

    private protected int FirstChain { get; }

    private protected int Chains { get; }

    private protected ProgressReporter[] Reporters { get; }

    /// <summary>Puts chain <paramref name="chain"/>'s stream and start into lane <paramref name="lane"/> of <see cref="State"/>.</summary>
    private protected abstract void PlaceLane(int lane, int chain);

    /// <summary>After every lane is placed: the starting energies (and their fault check).</summary>
    private protected abstract void Start();

    /// <summary>A chunk of adaptive burn-in; returns the updated log widths.</summary>
    private protected abstract TD AdaptChunk(TD logWidth, double[] gains, int chunk);

    /// <summary>A chunk of the recorded phase at the frozen <paramref name="width"/>; returns how many batches closed in it.</summary>
    private protected abstract int RecordChunk(TD width, int chunk, long done, ref int inBatch, int batchSize);

    /// <summary>
    /// Whether <see cref="ThrowIfFaulted"/> replays a faulted chunk from the walk as it was before it (the site walk does, to
    /// name the failing pair); only then is the walk copied before every chunk.
    /// </summary>
    private protected virtual bool ReplaysFaults => false;

    /// <summary>Clears the fault notes before a chunk.</summary>
    private protected abstract void ClearFaults();

    /// <summary>Throws when the chunk just run from <paramref name="before"/> (the walk before it when <see cref="ReplaysFaults"/>, else default) noted a NaN or −∞ energy (burn-in when <paramref name="gains"/> is set).</summary>
    private protected abstract void ThrowIfFaulted(in TState before, TD logWidthBefore, double[]? gains, TD width, int chunk);

    /// <summary>Burn-in is over: clears the sums and counts the recorded phase starts from.</summary>
    private protected abstract void ResetForRecording();

    /// <summary>Draws per batch of the records.</summary>
    private protected abstract int BatchSize { get; }

    /// <summary>Hands the sums of the <paramref name="closed"/> batches of the last chunk to the records.</summary>
    private protected abstract void AddClosedBatches(int closed);

    /// <summary>Closes the open moment block of <paramref name="count"/> steps into the records and clears its sums.</summary>
    private protected abstract void CloseBlock(int count);

    /// <summary>Writes the records and the tally (after the walk and the widths).</summary>
    private protected abstract void SaveRecords(StateWriter w);

    /// <summary>Reads what <see cref="SaveRecords"/> wrote.</summary>
    private protected abstract void LoadRecords(StateReader r);

    /// <summary>The run is over: moves the tally's counts and kept draws into the records.</summary>
    private protected abstract void Complete();

    /// <summary>Runs the group from its start or from its checkpointed state to the end; returns the frozen widths.</summary>
    private protected TD RunLanes(GroupCheckpoints checkpoints, int group, CancellationToken ct)
    {
        var saved = checkpoints.SavedState(group);
        if (saved is null)
        {
            for (int lane = 0; lane < TOps.Count; lane++)
            {
                PlaceLane(lane, Math.Min(FirstChain + lane, Chains - 1)); // padding lanes repeat the last chain and are dropped
            }
            Start();
            _logWidth = TOps.Broadcast(Math.Log(_initialWidth));
        }
        else
        {
            Load(new StateReader(saved, _what + " " + group.ToString(CultureInfo.InvariantCulture)));
        }
        var boundary = new ChunkBoundary(Reporters, checkpoints, group, this, ct);
        if (Phase == GroupPhase.BurnIn)
        {
            BurnIn(boundary);
            StartRecording();
            ResetForRecording();
        }
        var width = LaneAdaptation.Width<TOps, TD, TB>(_logWidth, _maxWidth);
        if (Phase == GroupPhase.Recording)
        {
            Record(width, boundary);
            Phase = GroupPhase.Finished;
        }
        checkpoints.Finished(group, this);
        Complete();
        foreach (var reporter in Reporters)
        {
            reporter.Finish();
        }
        return width;
    }

    private void BurnIn(ChunkBoundary boundary)
    {
        var gains = new double[ChunkSteps];
        for (; Step < _burnIn; Step += ChunkSteps)
        {
            boundary.Reached(Step);
            int chunk = (int)Math.Min(ChunkSteps, _burnIn - Step);
            LaneAdaptation.FillGains(gains, Step, chunk);
            ClearFaults();
            var before = ReplaysFaults ? State : default;
            var logWidthBefore = _logWidth;
            _logWidth = AdaptChunk(_logWidth, gains, chunk);
            ThrowIfFaulted(before, logWidthBefore, gains, default, chunk);
        }
    }

    /// <summary>
    /// The recorded phase: chunks end at moment-block and progress boundaries (every 4096 steps), where the bookkeeping
    /// that makes calls happens; batches close inside the chunk.
    /// </summary>
    private void Record(TD width, ChunkBoundary boundary)
    {
        int batchSize = BatchSize;
        while (Step < _samples)
        {
            if ((Step & (ChunkSteps - 1)) == 0)
            {
                boundary.Reached(_burnIn + Step);
            }
            int chunk = (int)Math.Min(_blockSize - InBlock, Math.Min(_samples - Step, ChunkSteps - (Step & (ChunkSteps - 1))));
            ClearFaults();
            var before = ReplaysFaults ? State : default;
            int closed = RecordChunk(width, chunk, Step, ref InBatch, batchSize);
            ThrowIfFaulted(before, default, null, width, chunk);
            AddClosedBatches(closed);
            Step += chunk;
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
        LaneWalkWords.Save(w, ref State);
        w.Words(_widthTag, LaneWalkWords.Lanes<TOps, TD, TB>(_logWidth));
        SaveRecords(w);
    }

    private void Load(StateReader r)
    {
        LoadProgress(r, _headerTag, BatchSize);
        LaneWalkWords.Load(r, ref State);
        _logWidth = LaneWalkWords.FromLanes<TOps, TD, TB>(r.Words(_widthTag, TOps.Count));
        LoadRecords(r);
        r.End();
    }

    /// <summary>Progress reporters for the live lanes of the group whose lane 0 is <paramref name="firstChain"/>.</summary>
    private protected static ProgressReporter[] MakeReporters(int firstChain, int chains, Func<int, ProgressReporter> make)
    {
        var reporters = new ProgressReporter[Math.Min(TOps.Count, chains - firstChain)];
        for (int lane = 0; lane < reporters.Length; lane++)
        {
            reporters[lane] = make(firstChain + lane);
        }
        return reporters;
    }

    /// <summary>Loads <paramref name="stream"/> into lane <paramref name="lane"/> of the four generator words.</summary>
    private protected static void SeedLane(ref TB r0, ref TB r1, ref TB r2, ref TB r3, int lane, in RandomStream stream)
        => LaneSeeding.Load<TOps, TD, TB>(ref r0, ref r1, ref r2, ref r3, lane, stream);
}
