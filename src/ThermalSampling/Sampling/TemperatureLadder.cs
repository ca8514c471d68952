using System;
using System.Collections.Generic;
using System.Globalization;
using System.Linq;
using System.Threading;
using ThermalSampling.Persistence;
using ThermalSampling.Randomness;

namespace ThermalSampling.Sampling;

/// <summary>What a temperature ladder's swaps did over the recorded phase.</summary>
/// <param name="Attempts">Swap attempts between rung k and k + 1 (one entry per neighbouring pair).</param>
/// <param name="Accepted">Accepted swaps between rung k and k + 1.</param>
/// <param name="RoundTrips">Completed round trips (a configuration's return to the lowest rung after it reached the highest), over every replica set.</param>
/// <param name="RoundTripSteps">Steps summed over the completed round trips.</param>
/// <param name="SwapInterval">Steps between swap attempts.</param>
internal sealed record LadderTallies(long[] Attempts, long[] Accepted, long RoundTrips, long RoundTripSteps, long SwapInterval);

/// <summary>
/// Replica exchange (parallel tempering) on the one lane engine: the lane groups of every rung of a temperature ladder
/// are advanced in lockstep to the next swap point, then neighbouring rungs of each replica set (chain c of every rung)
/// offer to exchange configurations, accepted with probability min(1, exp((β_k − β_{k+1})(V_k − V_{k+1}))) (Swendsen &amp;
/// Wang, Phys. Rev. Lett. 57, 2607 (1986); Geyer 1991; recalled from memory). Attempts alternate between the even and the
/// odd pairs (deterministic even–odd; common practice, no source). Configurations move; each rung keeps its −β, stream,
/// adapted width and records, so every rung's records have the form of a plain run's. Each replica set's swap decisions
/// come from a stream of its own, and each chain's steps from its own, so the results are the same bits for any thread
/// count and lane width. Checkpoints are written only where every group stands at the same step.
/// </summary>
internal sealed class TemperatureLadder
{
    private const int ChunkSteps = LaneAdaptation.ChunkSteps;

    private readonly LaneGroup[][] _groups;
    private readonly double[] _betas;
    private readonly int _chains, _lanes, _rungs;
    private readonly long _burnIn, _end, _interval;
    private readonly RandomStream[] _swapStreams;
    private readonly int[] _walkerAt;      // the configuration (walker) at rung k of set s: [k·C + s], walkers 0 … K − 1 within a set
    private readonly int[] _heading;       // per walker [s·K + w]: 0 not yet at the bottom, 1 left the bottom, 2 reached the top since
    private readonly long[] _leftBottom;   // per walker: the step it last arrived at the bottom coming from the top (or first arrived)
    private readonly long[] _attempts, _accepted;
    private long _roundTrips, _roundTripSteps;

    /// <param name="groups">Each rung's lane groups (rung k's chain c in group c / lanes, lane c mod lanes), built but not opened.</param>
    /// <param name="betas">Each rung's β, 1/eV, strictly decreasing (rung 0 the coldest).</param>
    /// <param name="settings">The run's settings (chains per rung, steps, seed, swap interval).</param>
    /// <param name="lanes">Lanes per group.</param>
    internal TemperatureLadder(LaneGroup[][] groups, double[] betas, SamplingSettings settings, int lanes)
    {
        _groups = groups;
        _betas = betas;
        _rungs = betas.Length;
        _chains = settings.Chains;
        _lanes = lanes;
        _burnIn = settings.BurnIn;
        _end = settings.BurnIn + settings.SamplesPerChain;
        _interval = settings.SwapInterval ?? throw new ArgumentException("The settings ask for no swaps.", nameof(settings));
        _swapStreams = new RandomStream[_chains];
        for (int s = 0; s < _chains; s++)
        {
            _swapStreams[s] = RandomStream.ForChain(settings.Seed, SwapStreamIndex(_rungs, _chains, s));
        }
        _walkerAt = new int[_rungs * _chains];
        _heading = new int[_rungs * _chains];
        _leftBottom = new long[_rungs * _chains];
        for (int s = 0; s < _chains; s++)
        {
            for (int k = 0; k < _rungs; k++)
            {
                _walkerAt[k * _chains + s] = k;
            }
        }
        _attempts = new long[_rungs - 1];
        _accepted = new long[_rungs - 1];
    }

    /// <summary>The stream of rung <paramref name="rung"/>'s chain c is <see cref="RandomStream.ForChain"/>(seed, rung·C + c).</summary>
    internal static int StreamOffset(int rung, int chains) => rung * chains;

    /// <summary>Replica set <paramref name="set"/>'s swap decisions come from stream K·C + set, after every chain's.</summary>
    internal static int SwapStreamIndex(int rungs, int chains, int set) => rungs * chains + set;

    /// <summary>
    /// Runs the ladder from its start, or from the session's checkpoint, to the end; returns each rung's chains' records
    /// (rung by rung, in chain order) and the swap tallies.
    /// </summary>
    internal (ChainRecord[][] Records, LadderTallies Tallies) Run(CheckpointSession? session, int? maxThreads, CancellationToken ct)
    {
        Open(session);
        long step = _groups[0][0].StepsDone;
        if (step == 0)
        {
            Observe(0);
        }
        var all = _groups.SelectMany(g => g).ToArray();
        bool serial = (maxThreads ?? Environment.ProcessorCount) == 1;
        while (step < _end)
        {
            long next = Math.Min(_end, Math.Min((step / _interval + 1) * _interval, NextBoundary(step)));
            if (serial || all.Length == 1)
            {
                foreach (var group in all)
                {
                    group.AdvanceTo(next);
                }
            }
            else
            {
                long target = next;
                ChainScheduler.RunAll(all.Length, maxThreads, CancellationToken.None, i =>
                {
                    all[i].AdvanceTo(target);
                    return 0;
                });
            }
            step = next;
            if (step % _interval == 0 && step < _end)
            {
                Swap(step);
                Observe(step);
            }
            if (step < _end && IsBoundary(step))
            {
                AtBoundary(session, ct);
            }
        }
        session?.DepositLadder(_groups, SaveSwaps(), finished: true, write: false);
        var records = _groups.Select(rung => rung.SelectMany(g => g.Close()).ToArray()).ToArray();
        return (records, new LadderTallies(_attempts, _accepted, _roundTrips, _roundTripSteps, _interval));
    }

    private void Open(CheckpointSession? session)
    {
        for (int k = 0; k < _rungs; k++)
        {
            for (int g = 0; g < _groups[k].Length; g++)
            {
                _groups[k][g].Open(session?.SavedState(k, g));
            }
        }
        if (session?.SavedLadder is byte[] saved)
        {
            LoadSwaps(new StateReader(saved, "temperature ladder"));
        }
        long first = _groups[0][0].StepsDone;
        foreach (var group in _groups.SelectMany(g => g))
        {
            if (group.StepsDone != first)
            {
                throw new CheckpointException("The checkpoint holds a temperature ladder's groups at different steps; a ladder is checkpointed only where every group stands at the same step.");
            }
        }
    }

    /// <summary>The next step after <paramref name="step"/> at which every group meets a chunk boundary (every 4096 steps of burn-in, the end of burn-in, every 4096 recorded steps).</summary>
    private long NextBoundary(long step)
        => step < _burnIn ? Math.Min(_burnIn, (step / ChunkSteps + 1) * ChunkSteps) : _burnIn + ((step - _burnIn) / ChunkSteps + 1) * ChunkSteps;

    private bool IsBoundary(long step) => step == _burnIn || (step < _burnIn ? step % ChunkSteps == 0 : (step - _burnIn) % ChunkSteps == 0);

    /// <summary>Where every group stands at the same step: cancellation (after handing in the state) and checkpoints.</summary>
    private void AtBoundary(CheckpointSession? session, CancellationToken ct)
    {
        if (ct.IsCancellationRequested)
        {
            session?.DepositLadder(_groups, SaveSwaps(), finished: false, write: false);
            ct.ThrowIfCancellationRequested();
        }
        if (session?.LadderCheckpointDue() == true)
        {
            session.DepositLadder(_groups, SaveSwaps(), finished: false, write: true);
        }
    }

    /// <summary>The swap event at <paramref name="step"/>: in every replica set, each even (or odd) neighbouring pair offers to exchange configurations.</summary>
    private void Swap(long step)
    {
        int parity = (int)(step / _interval & 1);
        bool counted = step > _burnIn;
        Span<double> a = stackalloc double[LaneGroup.MaxConfiguration];
        Span<double> b = stackalloc double[LaneGroup.MaxConfiguration];
        for (int s = 0; s < _chains; s++)
        {
            int g = s / _lanes, lane = s % _lanes;
            ref var stream = ref _swapStreams[s];
            for (int k = parity; k + 1 < _rungs; k += 2)
            {
                var lower = _groups[k][g];
                var upper = _groups[k + 1][g];
                double u = stream.NextUnitInterval();
                double logRatio = (_betas[k] - _betas[k + 1]) * (lower.Energy(lane) - upper.Energy(lane));
                bool accept = logRatio >= 0 || u < Math.Exp(logRatio); // u < 1 ≤ e^logRatio: the same decision without the exponential
                if (counted)
                {
                    _attempts[k]++;
                    _accepted[k] += accept ? 1 : 0;
                }
                if (!accept)
                {
                    continue;
                }
                lower.ReadConfiguration(lane, a);
                upper.ReadConfiguration(lane, b);
                lower.WriteConfiguration(lane, b);
                upper.WriteConfiguration(lane, a);
                (_walkerAt[k * _chains + s], _walkerAt[(k + 1) * _chains + s]) = (_walkerAt[(k + 1) * _chains + s], _walkerAt[k * _chains + s]);
            }
        }
    }

    /// <summary>Round trips: a walker at the lowest rung that has been at the highest since it left completes one.</summary>
    private void Observe(long step)
    {
        for (int s = 0; s < _chains; s++)
        {
            int bottom = s * _rungs + _walkerAt[s];
            if (_heading[bottom] != 1)
            {
                if (_heading[bottom] == 2 && step > _burnIn)
                {
                    _roundTrips++;
                    _roundTripSteps += step - _leftBottom[bottom];
                }
                _heading[bottom] = 1;
                _leftBottom[bottom] = step;
            }
            int top = s * _rungs + _walkerAt[(_rungs - 1) * _chains + s];
            if (_heading[top] == 1)
            {
                _heading[top] = 2;
            }
        }
    }

    private byte[] SaveSwaps()
    {
        var w = new StateWriter();
        w.Longs("LADH", [_rungs, _chains, _interval]);
        var words = new ulong[4 * _chains];
        for (int s = 0; s < _chains; s++)
        {
            _swapStreams[s].GetState(words.AsSpan(4 * s, 4));
        }
        w.Words("LSWR", words);
        w.Longs("LWLK", [.. _walkerAt.Select(v => (long)v)]);
        w.Longs("LHDG", [.. _heading.Select(v => (long)v)]);
        w.Longs("LLFT", _leftBottom);
        w.Longs("LATT", _attempts);
        w.Longs("LACC", _accepted);
        w.Longs("LTRP", [_roundTrips, _roundTripSteps]);
        return w.ToArray();
    }

    private void LoadSwaps(StateReader r)
    {
        var head = r.Longs("LADH", 3);
        r.InRange(head[0], _rungs, _rungs, "the ladder's rungs");
        r.InRange(head[1], _chains, _chains, "the chains per rung");
        r.InRange(head[2], _interval, _interval, "the swap interval");
        var words = r.Words("LSWR", 4 * _chains);
        for (int s = 0; s < _chains; s++)
        {
            _swapStreams[s] = RandomStream.FromState(words.AsSpan(4 * s, 4));
        }
        var walkers = r.Longs("LWLK", _walkerAt.Length);
        for (int i = 0; i < walkers.Length; i++)
        {
            _walkerAt[i] = (int)r.InRange(walkers[i], 0, _rungs - 1, "a walker's index");
        }
        var heading = r.Longs("LHDG", _heading.Length);
        for (int i = 0; i < heading.Length; i++)
        {
            _heading[i] = (int)r.InRange(heading[i], 0, 2, "a walker's heading");
        }
        r.Longs("LLFT", _leftBottom.Length).CopyTo(_leftBottom, 0);
        r.Longs("LATT", _attempts.Length).CopyTo(_attempts, 0);
        r.Longs("LACC", _accepted.Length).CopyTo(_accepted, 0);
        var trips = r.Longs("LTRP", 2);
        (_roundTrips, _roundTripSteps) = (trips[0], trips[1]);
        r.End();
    }

    /// <summary>Lanes per group of a ladder: a rung's chains fill one register where they can (rungs then spread over the threads).</summary>
    internal static int Lanes(SamplingSettings settings) => LaneGroups.ChooseLanes(settings.Chains, 1, settings.ChainsPerVector);

    /// <summary>
    /// Runs a ladder of <paramref name="plans"/> (rung k planned with stream offset <see cref="StreamOffset"/>(k, C)) at
    /// inverse temperatures <paramref name="betas"/>: builds every rung's lane groups, runs them with swaps, and returns
    /// each rung's record and the swap tallies.
    /// </summary>
    internal static (TemperatureRecord[] Records, LadderTallies Tallies) RunPlans(TemperaturePlan[] plans, double[] betas, SamplingSettings settings,
        CheckpointSession? session, CancellationToken ct)
    {
        int lanes = session?.Lanes ?? Lanes(settings);
        int chains = settings.Chains, perRung = (chains + lanes - 1) / lanes;
        session?.BeginLadder(perRung);
        var groups = new LaneGroup[plans.Length][];
        for (int k = 0; k < plans.Length; k++)
        {
            groups[k] = new LaneGroup[perRung];
            for (int g = 0; g < perRung; g++)
            {
                groups[k][g] = plans[k].BuildGroup(lanes, g * lanes, chains, g);
                groups[k][g].SkipReweighting(); // nothing reweights a rung's records, and every rung's fine energy bins at once do not stay in the cache
            }
        }
        var (records, tallies) = new TemperatureLadder(groups, betas, settings, lanes).Run(session, settings.MaxThreads, ct);
        return ([.. plans.Select((plan, k) => plan.Finish(records[k]))], tallies);
    }

    /// <summary>Checks that <paramref name="temperatures"/> (K) can form a ladder: at least two, strictly increasing.</summary>
    internal static void CheckLadder(IReadOnlyList<double> temperatures, string parameter)
    {
        if (temperatures.Count < 2)
        {
            throw new ArgumentException(string.Create(CultureInfo.InvariantCulture,
                $"Replica exchange needs a ladder of at least two temperatures; {parameter} has {temperatures.Count}."), parameter);
        }
        for (int i = 1; i < temperatures.Count; i++)
        {
            if (!(temperatures[i] > temperatures[i - 1]))
            {
                throw new ArgumentException(string.Create(CultureInfo.InvariantCulture,
                    $"A replica-exchange ladder's temperatures must increase: {parameter}[{i}] = {temperatures[i]:R} K follows {temperatures[i - 1]:R} K."), parameter);
            }
        }
    }
}
