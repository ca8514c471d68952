using System;
using System.Collections.Generic;
using System.IO;
using System.Linq;
using System.Threading;
using ThermalSampling.Landscapes;
using ThermalSampling.Potentials;
using ThermalSampling.Sampling;
using ThermalSampling.Units;
using Xunit;

namespace ThermalSampling.Tests;

/// <summary>
/// When checkpoints are written and what each one holds: one per chunk boundary at a zero interval, only the first at a
/// long one, every running group handed in before a checkpoint is written, and a cancelled run's last checkpoint taken
/// where each group stopped. Every resume from any of these checkpoints gives the uninterrupted bits (CheckpointTests);
/// these tests pin down the bookkeeping itself, which those resumes cannot see: a checkpoint that holds an older state
/// of some group still resumes to the same bits, only from further back. All runs are small (a few 4096-step chunks) so
/// that the checkpoints mutation mode can run them (docs/validation.md).
/// </summary>
public class CheckpointSessionTests
{
    private const long Chunk = 4096; // steps per group between chunk boundaries (the samplers' fixed chunk)
    private static readonly Mass Argon = Mass.FromAtomicMassUnits(39.948);
    private static readonly LennardJones Lj = LennardJones.FromMinimum(Length.FromAngstroms(3.8), Energy.FromKelvin(119.8)); // Sources.Argon (eps)
    private static readonly PairLandscape<LennardJones> Line = PairLandscape.Line(Lj, Length.FromAngstroms(3.2), Length.FromAngstroms(6.0));
    private static readonly Temperature[] TwoTemperatures = [Temperature.FromKelvin(30), Temperature.FromKelvin(60)];

    /// <summary>Two direct chains of three chunks each, one at a time.</summary>
    private static readonly SamplingSettings TwoDirectChains = new()
    {
        Seed = 11, Method = SamplingMethod.Direct, Chains = 2, SamplesPerChain = 3 * Chunk, BurnIn = 0, MaxThreads = 1,
    };

    private static SamplingCheckpoint Read(byte[] bytes) => SamplingCheckpoint.ReadFrom(new MemoryStream(bytes));

    private static List<SamplingCheckpoint> Checkpoints(CheckpointTests.Keeper keeper) => keeper.Saved.Select(Read).ToList();

    /// <summary>Progress kept on the reporting thread, in order.</summary>
    private sealed class Recorder(Action<SamplingProgress>? also = null) : IProgress<SamplingProgress>
    {
        private readonly List<SamplingProgress> _seen = new();

        public void Report(SamplingProgress value)
        {
            lock (_seen)
            {
                _seen.Add(value);
            }
            also?.Invoke(value);
        }

        internal IReadOnlyList<SamplingProgress> Seen => _seen;
    }

    [Fact]
    public void At_a_zero_interval_each_chunk_boundary_writes_one_checkpoint_holding_the_steps_done_so_far()
    {
        // One thread: chain 0 reaches its boundaries at 0, 4096 and 8192 steps, finishes, then chain 1 does the same,
        // then the second temperature. A group's first boundary hands in its starting state; each later one writes one
        // checkpoint, which holds every step done before it.
        var keeper = new CheckpointTests.Keeper();
        var progress = new Recorder();
        PairSampler.SweepWithCheckpoints(Line, Argon, TwoTemperatures, TwoDirectChains, keeper.Options(TimeSpan.Zero), progress);
        var checkpoints = Checkpoints(keeper);
        Assert.Equal(new[] { 1, 2, 4, 5, 7, 8, 10, 11 }.Select(k => k * Chunk), checkpoints.Select(c => c.ChainStepsDone));
        Assert.Equal(new[] { 0, 0, 0, 0, 1, 1, 1, 1 }, checkpoints.Select(c => c.FinishedTemperatures));
        // Progress: every boundary of every chain, then its end, in the order the single thread reached them.
        var expected = new List<(int, long)>();
        for (int t = 0; t < 2; t++)
        {
            for (int chain = 0; chain < 2; chain++)
            {
                expected.AddRange(new[] { 0, Chunk, 2 * Chunk, 3 * Chunk }.Select(s => (chain, s)));
            }
        }
        Assert.Equal(expected, progress.Seen.Select(p => (p.ChainIndex, p.ChainStepsDone)));
    }

    [Fact]
    public void Burn_in_steps_count_in_a_checkpoints_steps_done_before_and_after_recording_starts()
    {
        // One Metropolis chain, one chunk of burn-in and two recorded chunks: boundaries at 0 (burn-in: the starting
        // state is handed in), then 4096 and 8192 (recording: a checkpoint each); then the second temperature, after the
        // first's 12 288 steps.
        var settings = new SamplingSettings { Seed = 11, Chains = 1, SamplesPerChain = 2 * Chunk, BurnIn = Chunk, MaxThreads = 1, ChainsPerVector = 1 };
        var keeper = new CheckpointTests.Keeper();
        PairSampler.SweepWithCheckpoints(Line, Argon, TwoTemperatures, settings, keeper.Options(TimeSpan.Zero));
        Assert.Equal(new[] { 1, 2, 4, 5 }.Select(k => k * Chunk), Checkpoints(keeper).Select(c => c.ChainStepsDone));
        Assert.All(Checkpoints(keeper), c => Assert.Equal(2 * 3 * Chunk, c.ChainStepsTotal));
    }

    [Fact]
    public void At_a_long_interval_only_the_first_boundary_writes_a_checkpoint()
    {
        var keeper = new CheckpointTests.Keeper();
        PairSampler.SweepWithCheckpoints(Line, Argon, TwoTemperatures, TwoDirectChains, keeper.Options(TimeSpan.FromHours(1)));
        var only = Assert.Single(Checkpoints(keeper));
        Assert.Equal(Chunk, only.ChainStepsDone); // chain 0's second boundary: the first after its starting state
    }

    [Fact]
    public void Groups_running_side_by_side_all_hand_in_their_state_before_a_checkpoint_is_written()
    {
        // Two direct chains on two threads, held in step by a barrier in the progress sink (which runs after each
        // boundary's checkpoint bookkeeping): both reach boundary k before either goes on. The checkpoint of boundary k is
        // written by whichever chain hands in its state second, so it holds both chains at k: 2k chunks, never 2k − 1
        // (k = 1, 2 in each temperature; boundary 0 hands in the starting states).
        Assert.Equal(new[] { 2, 4, 8, 10 }.Select(k => k * Chunk), InStep().Select(c => c.ChainStepsDone));
    }

    /// <summary>The checkpoints of <see cref="TwoDirectChains"/> on two threads, held in step at every boundary, at a zero interval.</summary>
    private static List<SamplingCheckpoint> InStep()
    {
        using var barrier = new Barrier(2);
        bool inStep = true;
        var progress = new Recorder(_ => inStep &= barrier.SignalAndWait(TimeSpan.FromSeconds(30)));
        var keeper = new CheckpointTests.Keeper();
        PairSampler.SweepWithCheckpoints(Line, Argon, TwoTemperatures, TwoDirectChains with { MaxThreads = 2 }, keeper.Options(TimeSpan.Zero), progress);
        Assert.True(inStep, "the two chains did not run side by side");
        return Checkpoints(keeper);
    }

    [Fact]
    public void A_resumed_run_counts_the_restored_steps_and_finished_temperatures_in_its_own_checkpoints()
    {
        // From the side-by-side run's first checkpoint (both chains at 4096), resumed on one thread: chain 0's boundary
        // at 8192 writes a checkpoint before chain 1 has started, and chain 1's restored 4096 steps count in it.
        var keeper = new CheckpointTests.Keeper();
        PairSampler.Resume(Line, Argon, TwoTemperatures, TwoDirectChains, InStep()[0], keeper.Options(TimeSpan.Zero));
        Assert.Equal(new[] { 3, 5, 7, 8, 10, 11 }.Select(k => k * Chunk), Checkpoints(keeper).Select(c => c.ChainStepsDone));
        Assert.Equal(new[] { 0, 0, 1, 1, 1, 1 }, Checkpoints(keeper).Select(c => c.FinishedTemperatures));
        // From a checkpoint taken after the first temperature finished: it stays finished in every later checkpoint.
        var afterFirst = new CheckpointTests.Keeper();
        PairSampler.SweepWithCheckpoints(Line, Argon, TwoTemperatures, TwoDirectChains, afterFirst.Options(TimeSpan.Zero));
        var resumedFrom = Checkpoints(afterFirst)[4];
        Assert.Equal((1, 7 * Chunk), (resumedFrom.FinishedTemperatures, resumedFrom.ChainStepsDone));
        var later = new CheckpointTests.Keeper();
        PairSampler.Resume(Line, Argon, TwoTemperatures, TwoDirectChains, resumedFrom, later.Options(TimeSpan.Zero));
        Assert.Equal(new[] { 8, 10, 11 }.Select(k => k * Chunk), Checkpoints(later).Select(c => c.ChainStepsDone));
        Assert.All(Checkpoints(later), c => Assert.Equal(1, c.FinishedTemperatures));
    }

    [Fact]
    public void A_cancelled_run_stops_each_group_where_it_is_and_its_last_checkpoint_resumes_to_the_uninterrupted_bits()
    {
        string reference = CheckpointTests.Bits(PairSampler.Sweep(Line, Argon, TwoTemperatures, TwoDirectChains)[1]);
        var keeper = new CheckpointTests.Keeper();
        using var cts = new CancellationTokenSource();
        // Cancel when chain 1 of the first temperature reports its boundary at 4096 steps: it stops at its next boundary.
        var progress = new Recorder(p =>
        {
            if (p.ChainIndex == 1 && p.ChainStepsDone == Chunk)
            {
                cts.Cancel();
            }
        });
        Assert.ThrowsAny<OperationCanceledException>(() =>
            PairSampler.SweepWithCheckpoints(Line, Argon, TwoTemperatures, TwoDirectChains, keeper.Options(TimeSpan.FromHours(1)), progress, cts.Token));
        // Chain 0's checkpoint at 4096 steps, then the one written on cancellation: chain 0 finished (3 chunks), chain 1 at 2.
        var checkpoints = Checkpoints(keeper);
        Assert.Equal(new[] { Chunk, 5 * Chunk }, checkpoints.Select(c => c.ChainStepsDone));
        Assert.Equal(0, checkpoints[^1].FinishedTemperatures);
        // Chain 1 ran its chunk from 4096 to 8192 and stopped at that boundary without reporting it: nothing ran after.
        Assert.Equal((1, Chunk), (progress.Seen[^1].ChainIndex, progress.Seen[^1].ChainStepsDone));
        var resumed = PairSampler.Resume(Line, Argon, TwoTemperatures, TwoDirectChains, checkpoints[^1]);
        Assert.Equal(reference, CheckpointTests.Bits(resumed[1]));
    }

    [Fact]
    public void Runs_without_checkpoints_also_stop_at_the_next_boundary_once_cancelled()
    {
        // A plain run and a resume that writes no further checkpoints honour the token as a checkpointed run does:
        // cancelled when chain 0 reports 4096 steps, it stops at its boundary at 8192, before reporting it. (The resume
        // starts from the checkpoint at 4096, so its first report is that one.)
        var keeper = new CheckpointTests.Keeper();
        PairSampler.SweepWithCheckpoints(Line, Argon, TwoTemperatures, TwoDirectChains, keeper.Options(TimeSpan.FromHours(1)));
        var first = Read(keeper.Saved[0]);
        (Action<IProgress<SamplingProgress>, CancellationToken> Run, long[] Reports)[] runs =
        [
            ((progress, ct) => PairSampler.Sweep(Line, Argon, TwoTemperatures, TwoDirectChains, progress, ct), [0, Chunk]),
            ((progress, ct) => PairSampler.Resume(Line, Argon, TwoTemperatures, TwoDirectChains, first, checkpoints: null, progress, ct), [Chunk]),
        ];
        foreach (var (run, reports) in runs)
        {
            using var cts = new CancellationTokenSource();
            var progress = new Recorder(p =>
            {
                if (p.ChainStepsDone == Chunk)
                {
                    cts.Cancel();
                }
            });
            Assert.ThrowsAny<OperationCanceledException>(() => run(progress, cts.Token));
            Assert.Equal(reports, progress.Seen.Select(p => p.ChainStepsDone));
        }
    }
}
