using System;
using System.Buffers.Binary;
using System.Collections.Generic;
using System.Collections.Immutable;
using System.Diagnostics;
using System.Globalization;
using System.IO;
using System.Linq;
using System.Runtime.InteropServices;
using System.Text;
using System.Threading;
using ThermalSampling.Persistence;
using ThermalSampling.Numerics;

namespace ThermalSampling.Sampling;

/// <summary>Where a chain group is: adapting (burn-in), recording, or finished.</summary>
internal enum GroupPhase
{
    BurnIn = 0,
    Recording = 1,
    Finished = 2,
}

/// <summary>
/// Where a lane group is in its run, shared by the pair and site groups: the phase, the step within it, the open moment
/// block and batch, and the header section that records them in a checkpoint.
/// </summary>
internal abstract class LaneGroupProgress : IResumableGroup
{
    private readonly long _burnIn, _samples;
    private readonly int _width;

    private protected LaneGroupProgress(long burnIn, long samples, int width, int live)
    {
        (_burnIn, _samples, _width, Live) = (burnIn, samples, width, live);
    }

    /// <summary>Chains of the group that are counted (padding lanes are not).</summary>
    private protected int Live { get; }

    private protected GroupPhase Phase;
    private protected long Step;
    private protected int InBlock, InBatch;

    public long ChainStepsDone => Live * StepsDone;

    /// <summary>Steps each chain of the group has done (burn-in included).</summary>
    internal long StepsDone => Phase switch
    {
        GroupPhase.BurnIn => Step,
        GroupPhase.Recording => _burnIn + Step,
        _ => _burnIn + _samples,
    };

    /// <summary>Recorded steps so far (the retained draws and histogram counts a checkpoint must hold).</summary>
    private protected long RecordedSteps => Phase switch { GroupPhase.BurnIn => 0, GroupPhase.Recording => Step, _ => _samples };

    public abstract void Save(StateWriter writer);

    /// <summary>Burn-in is over: the recorded phase starts at step 0 with an empty moment block and batch.</summary>
    private protected void StartRecording()
    {
        Phase = GroupPhase.Recording;
        Step = 0;
        InBlock = InBatch = 0;
    }

    private protected void SaveProgress(StateWriter w, string tag) => w.Longs(tag, [_width, Live, (long)Phase, Step, InBlock, InBatch]);

    private protected void LoadProgress(StateReader r, string tag, int batchSize)
    {
        var head = r.Longs(tag, 6);
        r.InRange(head[0], _width, _width, "the lanes per vector");
        r.InRange(head[1], Live, Live, "the chains of the group");
        Phase = (GroupPhase)r.InRange(head[2], 0, 2, "the phase");
        Step = r.InRange(head[3], 0, Phase == GroupPhase.BurnIn ? _burnIn : _samples, "the step");
        InBlock = (int)r.InRange(head[4], 0, Statistics.BlockedMomentAccumulator.BlockSize - 1, "the open moment block");
        InBatch = (int)r.InRange(head[5], 0, batchSize - 1, "the open batch");
    }
}

/// <summary>What a group does at each chunk boundary: checkpoint bookkeeping (which may throw on cancellation), then progress.</summary>
internal sealed class ChunkBoundary(ProgressReporter[] reporters, GroupCheckpoints checkpoints, int group, IResumableGroup state, CancellationToken ct)
{
    internal void Reached(long done)
    {
        checkpoints.AtBoundary(group, state, ct);
        foreach (var p in reporters)
        {
            p.Report(done);
        }
    }
}

/// <summary>Lane values and whole walks as 64-bit words (field by field, lanes within a field).</summary>
internal static class LaneWalkWords
{
    internal static void Save<TWalk>(StateWriter w, string tag, ref TWalk walk) where TWalk : struct => w.Words(tag, Words(ref walk));

    internal static void Load<TWalk>(StateReader r, string tag, ref TWalk walk) where TWalk : struct
    {
        var words = Words(ref walk);
        r.Words(tag, words.Length).CopyTo(words);
    }

    private static Span<ulong> Words<TWalk>(ref TWalk walk) where TWalk : struct => MemoryMarshal.Cast<TWalk, ulong>(MemoryMarshal.CreateSpan(ref walk, 1));

    internal static ulong[] Lanes<TOps, TD, TB>(TD values)
        where TOps : struct, ILaneOps<TD, TB>
        where TD : struct
        where TB : struct
    {
        var words = new ulong[TOps.Count];
        for (int lane = 0; lane < words.Length; lane++)
        {
            words[lane] = BitConverter.DoubleToUInt64Bits(TOps.Get(values, lane));
        }
        return words;
    }

    internal static TD FromLanes<TOps, TD, TB>(ulong[] words)
        where TOps : struct, ILaneOps<TD, TB>
        where TD : struct
        where TB : struct
    {
        var values = TOps.Broadcast(0.0);
        for (int lane = 0; lane < words.Length; lane++)
        {
            values = TOps.Set(values, lane, BitConverter.UInt64BitsToDouble(words[lane]));
        }
        return values;
    }
}

/// <summary>One temperature's view of a <see cref="CheckpointSession"/> (or of none: then only cancellation is honoured).</summary>
internal sealed class GroupCheckpoints
{
    internal static readonly GroupCheckpoints None = new(null, -1);

    private readonly CheckpointSession? _session;
    private readonly int _temperature;

    internal GroupCheckpoints(CheckpointSession? session, int temperature)
    {
        _session = session;
        _temperature = temperature;
    }

    /// <summary>The group's state to continue from, or null to start it afresh; marks the group as running.</summary>
    internal byte[]? SavedState(int group) => _session?.Started(_temperature, group);

    /// <summary>At a chunk boundary: writes the group's state if a checkpoint is due or the run is cancelled; throws when cancelled.</summary>
    internal void AtBoundary(int group, IResumableGroup state, CancellationToken ct)
    {
        if (_session is null)
        {
            ct.ThrowIfCancellationRequested();
            return;
        }
        _session.AtBoundary(_temperature, group, state, ct);
    }

    /// <summary>The group is done: its final state stands for it in every later checkpoint.</summary>
    internal void Finished(int group, IResumableGroup state) => _session?.Deposit(_temperature, group, state, finished: true);
}

/// <summary>
/// Checkpoint bookkeeping of one sweep. Every group hands in its state at a chunk boundary when a checkpoint is requested
/// (on a timer, or at once when the run starts) or when the run is cancelled; the group that completes the set writes
/// the checkpoint. Groups are independent, so a checkpoint holds each group at its own step: resuming continues each one
/// from there, and the results are those of the uninterrupted run.
/// </summary>
internal sealed class CheckpointSession
{
    private readonly object _lock = new();
    private readonly CheckpointOptions? _options;
    private readonly SweepIdentity _identity;
    private readonly byte[]?[]?[] _states;
    private readonly long[]?[] _steps;
    private readonly bool[] _finished;
    private byte[]? _ladder;
    private int[] _served = [];
    private bool[] _running = [], _done = [];
    private int _generation, _written;
    private bool _writing;
    private long _due;

    /// <param name="identity">What is being run.</param>
    /// <param name="options">Where and how often to write; null writes nothing (a resume without further checkpoints).</param>
    /// <param name="resumeFrom">The checkpoint to continue from, already checked against <paramref name="identity"/>.</param>
    /// <param name="lanes">Lanes per vector for every group of the sweep.</param>
    internal CheckpointSession(SweepIdentity identity, CheckpointOptions? options, SamplingCheckpoint? resumeFrom, int lanes)
    {
        _identity = identity;
        _options = options;
        Lanes = lanes;
        int n = identity.Temperatures.Length;
        _states = resumeFrom is null ? new byte[]?[]?[n] : resumeFrom.CopyStates();
        _finished = resumeFrom is null ? new bool[n] : resumeFrom.CopyFinished();
        _steps = resumeFrom is null ? new long[]?[n] : resumeFrom.CopySteps();
        _ladder = resumeFrom?.LadderState;
        _due = Stopwatch.GetTimestamp(); // due at once: written at the first boundary after every running group has handed in its starting state
    }

    internal int Lanes { get; }

    internal CheckpointOptions? Options => _options;

    /// <summary>Starts temperature <paramref name="temperature"/> with <paramref name="groups"/> groups.</summary>
    internal GroupCheckpoints Begin(int temperature, int groups)
    {
        lock (_lock)
        {
            var states = _states[temperature] ??= new byte[]?[groups];
            if (states.Length != groups)
            {
                throw new CheckpointException(string.Create(CultureInfo.InvariantCulture,
                    $"The checkpoint holds {states.Length} chain groups for temperature {temperature + 1}; this run has {groups}."));
            }
            _steps[temperature] ??= new long[groups];
            _served = new int[groups];
            _running = new bool[groups];
            _done = new bool[groups];
        }
        return new GroupCheckpoints(this, temperature);
    }

    /// <summary>
    /// Starts a temperature ladder: every temperature at once, each with <paramref name="groups"/> groups. A ladder hands in
    /// every group together (<see cref="DepositLadder"/>), never one by one.
    /// </summary>
    internal void BeginLadder(int groups)
    {
        lock (_lock)
        {
            for (int t = 0; t < _states.Length; t++)
            {
                var states = _states[t] ??= new byte[]?[groups];
                if (states.Length != groups)
                {
                    throw new CheckpointException(string.Create(CultureInfo.InvariantCulture,
                        $"The checkpoint holds {states.Length} chain groups for temperature {t + 1}; this run has {groups}."));
                }
                _steps[t] ??= new long[groups];
            }
            if (_states.Any(s => s!.Any(g => g is not null)) && _ladder is null)
            {
                throw new CheckpointException("The checkpoint holds chain groups but no temperature ladder state: it was written by a run without replica exchange.");
            }
        }
    }

    /// <summary>Group <paramref name="group"/> of temperature <paramref name="temperature"/>'s saved state, or null (a ladder's groups).</summary>
    internal byte[]? SavedState(int temperature, int group)
    {
        lock (_lock)
        {
            return _states[temperature]?[group];
        }
    }

    /// <summary>The saved state of a temperature ladder's swaps, or null.</summary>
    internal byte[]? SavedLadder => _ladder;

    /// <summary>Whether a checkpoint is due (a ladder asks where every group stands at the same step).</summary>
    internal bool LadderCheckpointDue() => _options is not null && Stopwatch.GetTimestamp() >= Volatile.Read(ref _due);

    /// <summary>
    /// Hands in every group of a ladder (<paramref name="groups"/>[temperature][group]) and the swaps' state at once, all at
    /// the same step; <paramref name="finished"/> marks every temperature done; with <paramref name="write"/> the checkpoint is written now.
    /// </summary>
    internal void DepositLadder(LaneGroup[][] groups, byte[] ladder, bool finished, bool write)
    {
        if (_options is null)
        {
            return;
        }
        var blobs = new byte[groups.Length][][];
        for (int t = 0; t < groups.Length; t++)
        {
            blobs[t] = new byte[groups[t].Length][];
            for (int g = 0; g < groups[t].Length; g++)
            {
                var writer = new StateWriter();
                groups[t][g].Save(writer);
                blobs[t][g] = writer.ToArray();
            }
        }
        SamplingCheckpoint snapshot;
        lock (_lock)
        {
            for (int t = 0; t < groups.Length; t++)
            {
                for (int g = 0; g < groups[t].Length; g++)
                {
                    _states[t]![g] = blobs[t][g];
                    _steps[t]![g] = groups[t][g].ChainStepsDone;
                }
                _finished[t] |= finished;
            }
            _ladder = ladder;
            if (!write)
            {
                return;
            }
            snapshot = Assemble();
        }
        _options.Save(snapshot);
        lock (_lock)
        {
            _due = Stopwatch.GetTimestamp() + (long)(_options.Interval.TotalSeconds * Stopwatch.Frequency);
        }
    }

    /// <summary>Temperature <paramref name="temperature"/> has finished; its groups' final states stay in later checkpoints.</summary>
    internal void End(int temperature)
    {
        lock (_lock)
        {
            _finished[temperature] = true;
        }
    }

    internal byte[]? Started(int temperature, int group)
    {
        lock (_lock)
        {
            _running[group] = true;
            _served[group] = -1;
            return _states[temperature]![group];
        }
    }

    internal void AtBoundary(int temperature, int group, IResumableGroup state, CancellationToken ct)
    {
        if (ct.IsCancellationRequested)
        {
            if (_options is not null)
            {
                Deposit(temperature, group, state, finished: false, write: false);
            }
            ct.ThrowIfCancellationRequested();
        }
        if (_options is null)
        {
            return;
        }
        if (Volatile.Read(ref _generation) > _served[group])
        {
            Deposit(temperature, group, state, finished: false);
        }
        else if (!Volatile.Read(ref _writing) && Stopwatch.GetTimestamp() >= Volatile.Read(ref _due))
        {
            lock (_lock)
            {
                if (!_writing && _generation == _written && Stopwatch.GetTimestamp() >= _due)
                {
                    // The generation first, then the due time: a group that reads the new due time sees the new generation.
                    Volatile.Write(ref _generation, _generation + 1);
                    Volatile.Write(ref _due, long.MaxValue);
                }
            }
            Deposit(temperature, group, state, finished: false);
        }
        else if (Volatile.Read(ref _generation) > _served[group])
        {
            // Another group started a checkpoint between the two reads above (it moved the due time past this one's
            // read): hand in the state now rather than a chunk later, or the checkpoint would wait for this group's
            // next boundary and hold the other group's state of a chunk before.
            Deposit(temperature, group, state, finished: false);
        }
    }

    /// <summary>Records the group's state; when that completes a requested checkpoint, writes it (on this thread).</summary>
    internal void Deposit(int temperature, int group, IResumableGroup state, bool finished, bool write = true)
    {
        if (_options is null)
        {
            return;
        }
        var writer = new StateWriter();
        state.Save(writer);
        var blob = writer.ToArray();
        SamplingCheckpoint? due = null;
        int generation;
        lock (_lock)
        {
            _states[temperature]![group] = blob;
            _steps[temperature]![group] = state.ChainStepsDone;
            _served[group] = _generation;
            _done[group] |= finished;
            generation = _generation;
            if (write && !_writing && _generation > _written && EveryGroupServed())
            {
                _writing = true;
                due = Assemble();
            }
        }
        if (due is not null)
        {
            try
            {
                _options.Save(due);
            }
            finally
            {
                lock (_lock)
                {
                    _written = generation;
                    _writing = false;
                    _due = Stopwatch.GetTimestamp() + (long)(_options.Interval.TotalSeconds * Stopwatch.Frequency);
                }
            }
        }
    }

    private bool EveryGroupServed()
    {
        for (int g = 0; g < _served.Length; g++)
        {
            if (_running[g] && !_done[g] && _served[g] < _generation)
            {
                return false;
            }
        }
        return true;
    }

    /// <summary>After a cancellation (every running group has handed in its state): writes the checkpoint.</summary>
    internal void SaveAfterCancellation()
    {
        if (_options is null)
        {
            return;
        }
        SamplingCheckpoint snapshot;
        lock (_lock)
        {
            snapshot = Assemble();
        }
        _options.Save(snapshot);
    }

    private SamplingCheckpoint Assemble()
    {
        var states = new byte[]?[]?[_states.Length];
        for (int t = 0; t < states.Length; t++)
        {
            states[t] = (byte[]?[]?)_states[t]?.Clone();
        }
        var steps = new long[]?[_steps.Length];
        for (int t = 0; t < steps.Length; t++)
        {
            steps[t] = (long[]?)_steps[t]?.Clone();
        }
        return new SamplingCheckpoint(_identity, Lanes, states, steps, (bool[])_finished.Clone(), _options?.ApplicationData) { LadderState = _ladder };
    }
}

/// <summary>The temperature loop of a checkpointed sweep, shared by the pair and site samplers.</summary>
internal static class CheckpointedSweep
{
    internal static ImmutableArray<TReport> Run<TReport>(int count, CheckpointSession session, Func<int, TReport> runOne)
    {
        var reports = ImmutableArray.CreateBuilder<TReport>(count);
        for (int t = 0; t < count; t++)
        {
            try
            {
                reports.Add(runOne(t));
            }
            catch (OperationCanceledException)
            {
                session.SaveAfterCancellation();
                throw;
            }
        }
        return reports.MoveToImmutable();
    }

    internal static SweepIdentity Identity(string kind, string description, string fingerprint, Units.Mass mass, List<Units.Temperature> temperatures,
        SamplingSettings settings)
        => new(kind, description, fingerprint, mass.InAtomicMassUnits, temperatures.Select(t => t.InKelvin).ToImmutableArray(), settings,
            Internal.LibraryVersion.Current);
}
