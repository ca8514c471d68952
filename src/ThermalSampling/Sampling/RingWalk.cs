using System;
using System.Runtime.CompilerServices;
using System.Runtime.InteropServices;
using ThermalSampling.Landscapes;
using ThermalSampling.Numerics;
using ThermalSampling.Persistence;
using ThermalSampling.Potentials;
using ThermalSampling.Randomness;

namespace ThermalSampling.Sampling;

/// <summary>How a ring's shape is moved after the whole-ring translation.</summary>
internal enum RingMoves
{
    /// <summary>Staging: segments redrawn from the free-particle bridge (the library's walk).</summary>
    Staging,

    /// <summary>One bead at a time, a uniform offset of ±σ per coordinate accepted on springs and potential together: the plain textbook move, kept as the benchmarks' baseline (its efficiency falls as P grows).</summary>
    SingleBead,
}

/// <summary>A ring polymer's size: P beads, staging segments of L links, and ħ²/m (eV·Å²), which sets the springs; <paramref name="Moves"/> the shape moves.</summary>
internal sealed record RingPlan(int Beads, int Segment, double HbarSquaredOverMass, RingMoves Moves = RingMoves.Staging);

/// <summary>
/// Where the beads of a ring polymer live: the potential energy of one bead, and its signed distance to the nearest hard
/// wall (negative outside). A struct implemented once per landscape kind, so the ring walk's calls inline.
/// </summary>
/// <typeparam name="TD">Doubles, one per lane.</typeparam>
internal interface IBeadField<TD> where TD : struct
{
    /// <summary>1 for a line, 3 for radial pairs (the relative vector) and sites.</summary>
    int Dimensions { get; }

    /// <summary>The potential's description, for error messages.</summary>
    string Description { get; }

    /// <summary>The potential energy at (x, y, z), eV (a line reads x only).</summary>
    TD Energy(TD x, TD y, TD z);

    /// <summary>The signed distance from (x, y, z) to the nearest hard wall, Å: positive inside, negative outside.</summary>
    TD Wall(TD x, TD y, TD z);

    /// <summary>What the records see of a bead at (x, y, z): the separation (line: x; radial: |r|) or the point (site).</summary>
    void Recorded(TD x, TD y, TD z, out TD rx, out TD ry, out TD rz);
}

// Stryker disable all : vector-lane kernel, in no mutation mode (eng/mutation-testing.sh); PathIntegralTests check it against closed forms
/// <summary>
/// The path-integral walk: a ring polymer of P beads in every lane, the primitive (Trotter) factorisation of the quantum
/// Boltzmann operator, exp(−Σ_k [mP(x_{k+1} − x_k)²/(2βħ²) + (β/P)V(x_k)]) (Feynman &amp; Hibbs 1965; Barker, J. Chem.
/// Phys. 70, 2914 (1979)). One step is
/// <list type="number">
/// <item>a translation of the whole ring by a uniform offset of the engine's adapted width in each coordinate, accepted
/// with e^(−(β/P)ΔΣV) (the springs do not change), which moves the centroid however stiff the springs are; its acceptance
/// is what the engine adapts and records;</item>
/// <item>a staging sweep: the ring cut into P/L segments of L links (starting at bead t mod L, t the step count), each
/// segment's L − 1 inner beads redrawn exactly from the free-particle bridge between its fixed ends (the Lévy construction:
/// bead j from bead j − 1 and the end, mean ((L − j)x_{j−1} + x_end)/(L − j + 1), variance σ²(L − j)/(L − j + 1),
/// σ² = βħ²/(mP)), accepted with e^(−(β/P)ΔΣV) over the segment. The springs are sampled, not proposed at random, so
/// the acceptance depends on how far V changes over a segment, not on P (Sprik, Klein &amp; Chandler, Phys. Rev. B 31,
/// 4234 (1985); Pollock &amp; Ceperley, Phys. Rev. B 30, 2555 (1984)).</item>
/// </list>
/// The records see one bead per step, bead t mod P, so over a run every bead contributes alike (each bead's marginal is the
/// quantum position density at this P).
/// Hard walls: a bead outside is rejected, and each link carries the image factor 1 − e^(−2 d_a d_b/σ²) of the exact
/// free propagator beside a flat wall (d the beads' distances to the nearest wall), so that paths which cross the wall
/// between two beads inside are counted out too; skipped when every link of the move is so far from the walls that the
/// factor is 1 to 17 digits.
/// The segment start and the recorded bead depend on the step count only, so every lane indexes the same beads and a
/// chain's draws are the same bits at every lane width.
/// </summary>
internal readonly struct RingWalk<TOps, TD, TB, TField> : ILaneWalk<TD, RingState<TD, TB>>
    where TOps : struct, ILaneOps<TD, TB>
    where TD : struct
    where TB : struct
    where TField : struct, IBeadField<TD>
{
    /// <summary>Beyond 2d_a d_b/σ² = 40 the image factor is 1 − e^−40, 1 to 17 digits.</summary>
    private const double FarFromWalls = 40;

    private readonly TField _field;
    private readonly int _beads, _segment, _dimensions;
    private readonly bool _singleBead;
    private readonly long _stride;
    private readonly double _hbarSquaredOverMass;
    private readonly TD[] _bead, _trial;          // [3k + d]
    private readonly TD[] _energy, _trialEnergy;   // [k]
    private readonly TD[] _wall, _trialWall;       // [k]
    private readonly double[] _keep, _pull, _spread; // per inner bead j of a segment: (L − j)/(L − j + 1), 1/(L − j + 1), √((L − j)/(L − j + 1))

    /// <param name="field">Where the beads live.</param>
    /// <param name="beads">P, 1 to 4096.</param>
    /// <param name="segment">L, the staging length: a power of two that divides P (ignored when P = 1).</param>
    /// <param name="hbarSquaredOverMass">ħ²/m, eV·Å².</param>
    /// <param name="moves">The shape moves.</param>
    internal RingWalk(TField field, int beads, int segment, double hbarSquaredOverMass, RingMoves moves = RingMoves.Staging)
    {
        _singleBead = moves == RingMoves.SingleBead;
        // The recorded bead jumps by the odd number nearest 0.618·P (P is a power of two, so every bead comes round once
        // in P steps), so that consecutive records lie far apart on the ring and share less of its slow modes.
        _stride = beads <= 2 ? 1 : (long)Math.Round(0.618 * beads) | 1;
        _field = field;
        _beads = beads;
        _segment = Math.Max(1, Math.Min(segment, beads));
        _dimensions = field.Dimensions;
        _hbarSquaredOverMass = hbarSquaredOverMass;
        _bead = new TD[3 * beads];
        _trial = new TD[3 * beads];
        _energy = new TD[beads];
        _trialEnergy = new TD[beads];
        _wall = new TD[beads];
        _trialWall = new TD[beads];
        _keep = new double[_segment];
        _pull = new double[_segment];
        _spread = new double[_segment];
        for (int j = 1; j < _segment; j++)
        {
            double left = _segment - j;
            _keep[j] = left / (left + 1);
            _pull[j] = 1 / (left + 1);
            _spread[j] = Math.Sqrt(left / (left + 1));
        }
    }

    public void Place(ref RingState<TD, TB> state, int lane, in RandomStream stream, double beta, double x, double y, double z)
    {
        LaneSeeding.Load<TOps, TD, TB>(ref state.R0, ref state.R1, ref state.R2, ref state.R3, lane, stream);
        double spreadSquared = beta * _hbarSquaredOverMass / _beads;
        state.NegativeBeta = TOps.Set(state.NegativeBeta, lane, -beta);
        state.NegativeBetaPerBead = TOps.Set(state.NegativeBetaPerBead, lane, -beta / _beads);
        state.Spread = TOps.Set(state.Spread, lane, Math.Sqrt(spreadSquared));
        state.TwoOverSpreadSquared = TOps.Set(state.TwoOverSpreadSquared, lane, 2 / spreadSquared);
        for (int k = 0; k < _beads; k++)
        {
            _bead[3 * k] = TOps.Set(_bead[3 * k], lane, x);
            _bead[3 * k + 1] = TOps.Set(_bead[3 * k + 1], lane, y);
            _bead[3 * k + 2] = TOps.Set(_bead[3 * k + 2], lane, z);
        }
        state.Turn = 0;
    }

    public void Start(ref RingState<TD, TB> state)
    {
        var faults = LaneFaultCheck.None<TOps, TD, TB>();
        for (int k = 0; k < _beads; k++)
        {
            TD x = _bead[3 * k], y = _bead[3 * k + 1], z = _bead[3 * k + 2];
            _energy[k] = _field.Energy(x, y, z);
            _wall[k] = _field.Wall(x, y, z);
            LaneFaultCheck.Note<TOps, TD, TB>(ref faults, x, _energy[k]);
        }
        LaneFaultCheck.ThrowIfAny<TOps, TD, TB, TField>(faults, _field, static f => f.Description);
        Show(ref state, 0);
    }

    public void SaveOwn(StateWriter w)
    {
        w.Words("RINGB", MemoryMarshal.Cast<TD, ulong>(_bead.AsSpan()));
        w.Words("RINGE", MemoryMarshal.Cast<TD, ulong>(_energy.AsSpan()));
        w.Words("RINGW", MemoryMarshal.Cast<TD, ulong>(_wall.AsSpan()));
    }

    public void LoadOwn(StateReader r)
    {
        Read(r, "RINGB", _bead);
        Read(r, "RINGE", _energy);
        Read(r, "RINGW", _wall);
    }

    private static void Read(StateReader r, string tag, TD[] into)
    {
        var target = MemoryMarshal.Cast<TD, ulong>(into.AsSpan());
        r.Words(tag, target.Length).CopyTo(target);
    }

    public void ClearFaults(ref RingState<TD, TB> state) => state.Faults = LaneFaultCheck.None<TOps, TD, TB>();

    public bool ReplaysFaults => false;

    /// <summary>Not offered: a ring's configuration is its P beads, kept outside the lane state (replica exchange of path integrals is refused before a run starts).</summary>
    public void ReadConfiguration(in RingState<TD, TB> state, int lane, Span<double> values)
        => throw new NotSupportedException("Replica exchange does not swap ring polymers.");

    /// <summary>Not offered (<see cref="ReadConfiguration"/>).</summary>
    public void WriteConfiguration(ref RingState<TD, TB> state, int lane, ReadOnlySpan<double> values)
        => throw new NotSupportedException("Replica exchange does not swap ring polymers.");

    public void StreamState(in RingState<TD, TB> state, int lane, Span<ulong> words)
        => (words[0], words[1], words[2], words[3]) = (TOps.GetBits(state.R0, lane), TOps.GetBits(state.R1, lane), TOps.GetBits(state.R2, lane), TOps.GetBits(state.R3, lane));

    public void ThrowIfFaulted(in RingState<TD, TB> state, in RingState<TD, TB> before, TD logWidthBefore, double[]? gains, TD width, int chunk)
        => LaneFaultCheck.ThrowIfAny<TOps, TD, TB, TField>(state.Faults, _field, static f => f.Description);

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public LanePoint<TD> Point(in RingState<TD, TB> state) => new(state.X, state.Y, state.Z, state.Energy);

    /// <summary>Bead k as the records see it.</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private void Show(ref RingState<TD, TB> state, int k)
    {
        _field.Recorded(_bead[3 * k], _bead[3 * k + 1], _bead[3 * k + 2], out state.X, out state.Y, out state.Z);
        state.Energy = _energy[k];
    }

    public TD Step(ref RingState<TD, TB> state, TD width)
    {
        long turn = state.Turn;
        var accept = Translate(ref state, width);
        if (_beads > 1 && _singleBead)
        {
            for (int k = 0; k < _beads; k++)
            {
                MoveOne(ref state, k);
            }
        }
        else if (_beads > 1)
        {
            int offset = (int)(turn % _segment);
            for (int a = offset; a < _beads + offset; a += _segment)
            {
                Regrow(ref state, a % _beads);
            }
        }
        Show(ref state, (int)(turn * _stride % _beads));
        if (state.Recording != 0 && (turn & (VirialEvery - 1)) == 0)
        {
            AddKinetic(ref state);
        }
        state.Turn = turn + 1;
        return accept;
    }

    /// <summary>The centroid-virial estimator is taken every this-many steps (two energies per bead each time).</summary>
    internal const int VirialEvery = 16;

    /// <summary>Relative step of the central difference along each bead's displacement from the centroid.</summary>
    private const double VirialStep = 1e-4;

    /// <summary>
    /// The centroid-virial kinetic energy of the ring (Herman, Bruskin &amp; Berne, J. Chem. Phys. 76, 5150 (1982); Cao &amp;
    /// Berne, J. Chem. Phys. 91, 6359 (1989)): K = d/(2β) + (1/2P) Σ_k (x_k − x_c)·∇V(x_k), with x_c the centroid and the
    /// directional derivative by a central difference of the lane energies at x_k ± h(x_k − x_c), h = 1e−4 (its error is
    /// of order h²|x_k − x_c|²V‴, far below the statistical one).
    /// </summary>
    private void AddKinetic(ref RingState<TD, TB> state)
    {
        var zero = TOps.Broadcast(0.0);
        TD cx = zero, cy = zero, cz = zero;
        for (int k = 0; k < _beads; k++)
        {
            cx = TOps.Add(cx, _bead[3 * k]);
            cy = TOps.Add(cy, _bead[3 * k + 1]);
            cz = TOps.Add(cz, _bead[3 * k + 2]);
        }
        var inverse = TOps.Broadcast(1.0 / _beads);
        (cx, cy, cz) = (TOps.Multiply(cx, inverse), TOps.Multiply(cy, inverse), TOps.Multiply(cz, inverse));
        var h = TOps.Broadcast(VirialStep);
        var sum = zero;
        for (int k = 0; k < _beads; k++)
        {
            TD x = _bead[3 * k], y = _bead[3 * k + 1], z = _bead[3 * k + 2];
            TD dx = TOps.Multiply(h, TOps.Subtract(x, cx)), dy = TOps.Multiply(h, TOps.Subtract(y, cy)), dz = TOps.Multiply(h, TOps.Subtract(z, cz));
            var up = _field.Energy(TOps.Add(x, dx), TOps.Add(y, dy), TOps.Add(z, dz));
            var down = _field.Energy(TOps.Subtract(x, dx), TOps.Subtract(y, dy), TOps.Subtract(z, dz));
            sum = TOps.Add(sum, TOps.Subtract(up, down));
        }
        // Σ (up − down)/(2h) / (2P) + d/(2β), with 1/β = −1/(−β).
        var virial = TOps.Multiply(sum, TOps.Broadcast(1.0 / (4 * VirialStep * _beads)));
        var kinetic = TOps.Subtract(virial, TOps.Divide(TOps.Broadcast(0.5 * _dimensions), state.NegativeBeta));
        state.KineticSum = TOps.Add(state.KineticSum, kinetic);
        state.KineticSquares = TOps.MultiplyAdd(kinetic, kinetic, state.KineticSquares);
        state.KineticCount++;
    }

    public void StartRecording(ref RingState<TD, TB> state)
    {
        state.KineticSum = state.KineticSquares = TOps.Broadcast(0.0);
        state.KineticCount = 0;
        state.Recording = 1;
    }

    public void Complete(in RingState<TD, TB> state, int lane, ChainRecord record)
        => record.Kinetic = (TOps.Get(state.KineticSum, lane), TOps.Get(state.KineticSquares, lane), state.KineticCount);

    /// <summary>The whole ring moved by one uniform offset per coordinate; returns the acceptance mask.</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private TD Translate(ref RingState<TD, TB> state, TD width)
    {
        var dx = TOps.Multiply(width, LaneMath.NextOffsetPair<TOps, TD, TB>(ref state.R0, ref state.R1, ref state.R2, ref state.R3, out var dy));
        dy = TOps.Multiply(width, dy);
        var dz = TOps.Broadcast(0.0);
        if (_dimensions == 3)
        {
            dz = TOps.Multiply(width, LaneMath.NextOffsetPair<TOps, TD, TB>(ref state.R0, ref state.R1, ref state.R2, ref state.R3, out _));
        }
        else
        {
            dy = dz;
        }
        var u = LaneMath.NextUnit<TOps, TD, TB>(ref state.R0, ref state.R1, ref state.R2, ref state.R3);
        var zero = TOps.Broadcast(0.0);
        var inside = TOps.LessOrEqual(zero, zero);
        var change = zero;
        var nearest = TOps.Broadcast(double.MaxValue);
        for (int k = 0; k < _beads; k++)
        {
            TD x = _bead[3 * k], y = _bead[3 * k + 1], z = _bead[3 * k + 2];
            TD nx = TOps.Add(x, dx), ny = TOps.Add(y, dy), nz = TOps.Add(z, dz);
            var wall = _field.Wall(nx, ny, nz);
            var @in = TOps.LessOrEqual(zero, wall);
            inside = TOps.And(inside, @in);
            // Outside beads evaluate the old point (whose energy is finite) and the move is rejected below.
            var e = _field.Energy(TOps.Select(@in, nx, x), TOps.Select(@in, ny, y), TOps.Select(@in, nz, z));
            LaneFaultCheck.Note<TOps, TD, TB>(ref state.Faults, nx, e);
            (_trial[3 * k], _trial[3 * k + 1], _trial[3 * k + 2]) = (nx, ny, nz);
            _trialEnergy[k] = e;
            _trialWall[k] = wall;
            change = TOps.Add(change, TOps.Subtract(e, _energy[k]));
            nearest = Min(nearest, Min(wall, _wall[k]));
        }
        var ratio = LaneMath.Exp<TOps, TD, TB>(TOps.Multiply(state.NegativeBetaPerBead, change));
        var threshold = u;
        if (_beads > 1 && !FarFromAllWalls(nearest, state.TwoOverSpreadSquared))
        {
            ratio = TOps.Multiply(ratio, ImageProduct(_trialWall, 0, _beads, _beads, state.TwoOverSpreadSquared));
            threshold = TOps.Multiply(u, ImageProduct(_wall, 0, _beads, _beads, state.TwoOverSpreadSquared));
        }
        var accept = TOps.And(inside, TOps.LessThan(threshold, ratio));
        for (int k = 0; k < _beads; k++)
        {
            Take(accept, k);
        }
        return accept;
    }

    /// <summary>Segment from bead <paramref name="a"/> to bead a + L (mod P): its inner beads redrawn from the free bridge, then the Metropolis test on V.</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private void Regrow(ref RingState<TD, TB> state, int a)
    {
        int b = (a + _segment) % _beads;
        TD px = _bead[3 * a], py = _bead[3 * a + 1], pz = _bead[3 * a + 2];
        TD ex = _bead[3 * b], ey = _bead[3 * b + 1], ez = _bead[3 * b + 2];
        var zero = TOps.Broadcast(0.0);
        var inside = TOps.LessOrEqual(zero, zero);
        var change = zero;
        var nearest = Min(_wall[a], _wall[b]);
        TD spare = zero;
        bool haveSpare = false;
        for (int j = 1; j < _segment; j++)
        {
            int k = (a + j) % _beads;
            var keep = TOps.Broadcast(_keep[j]);
            var pull = TOps.Broadcast(_pull[j]);
            var sd = TOps.Multiply(state.Spread, TOps.Broadcast(_spread[j]));
            px = TOps.MultiplyAdd(sd, Gaussian(ref state, ref spare, ref haveSpare), TOps.MultiplyAdd(keep, px, TOps.Multiply(pull, ex)));
            if (_dimensions == 3)
            {
                py = TOps.MultiplyAdd(sd, Gaussian(ref state, ref spare, ref haveSpare), TOps.MultiplyAdd(keep, py, TOps.Multiply(pull, ey)));
                pz = TOps.MultiplyAdd(sd, Gaussian(ref state, ref spare, ref haveSpare), TOps.MultiplyAdd(keep, pz, TOps.Multiply(pull, ez)));
            }
            var wall = _field.Wall(px, py, pz);
            var @in = TOps.LessOrEqual(zero, wall);
            inside = TOps.And(inside, @in);
            TD x = _bead[3 * k], y = _bead[3 * k + 1], z = _bead[3 * k + 2];
            var e = _field.Energy(TOps.Select(@in, px, x), TOps.Select(@in, py, y), TOps.Select(@in, pz, z));
            LaneFaultCheck.Note<TOps, TD, TB>(ref state.Faults, px, e);
            (_trial[3 * k], _trial[3 * k + 1], _trial[3 * k + 2]) = (px, py, pz);
            _trialEnergy[k] = e;
            _trialWall[k] = wall;
            change = TOps.Add(change, TOps.Subtract(e, _energy[k]));
            nearest = Min(nearest, Min(wall, _wall[k]));
        }
        var u = LaneMath.NextUnit<TOps, TD, TB>(ref state.R0, ref state.R1, ref state.R2, ref state.R3);
        var ratio = LaneMath.Exp<TOps, TD, TB>(TOps.Multiply(state.NegativeBetaPerBead, change));
        var threshold = u;
        if (!FarFromAllWalls(nearest, state.TwoOverSpreadSquared))
        {
            // The segment's L links: the trial inner beads between the fixed ends, against the current ones.
            (_trialWall[a], _trialWall[b]) = (_wall[a], _wall[b]);
            ratio = TOps.Multiply(ratio, ImageProduct(_trialWall, a, _segment, _beads, state.TwoOverSpreadSquared));
            threshold = TOps.Multiply(u, ImageProduct(_wall, a, _segment, _beads, state.TwoOverSpreadSquared));
        }
        var accept = TOps.And(inside, TOps.LessThan(threshold, ratio));
        for (int j = 1; j < _segment; j++)
        {
            Take(accept, (a + j) % _beads);
        }
    }

    /// <summary>The baseline's move: bead k alone by a uniform offset of ±σ per coordinate, accepted on the change of its two springs and its energy.</summary>
    private void MoveOne(ref RingState<TD, TB> state, int k)
    {
        int before = (k + _beads - 1) % _beads, after = (k + 1) % _beads;
        var ox = TOps.Multiply(state.Spread, LaneMath.NextOffsetPair<TOps, TD, TB>(ref state.R0, ref state.R1, ref state.R2, ref state.R3, out var oy));
        oy = TOps.Multiply(state.Spread, oy);
        var oz = TOps.Broadcast(0.0);
        if (_dimensions == 3)
        {
            oz = TOps.Multiply(state.Spread, LaneMath.NextOffsetPair<TOps, TD, TB>(ref state.R0, ref state.R1, ref state.R2, ref state.R3, out _));
        }
        else
        {
            oy = oz;
        }
        var u = LaneMath.NextUnit<TOps, TD, TB>(ref state.R0, ref state.R1, ref state.R2, ref state.R3);
        TD x = _bead[3 * k], y = _bead[3 * k + 1], z = _bead[3 * k + 2];
        TD nx = TOps.Add(x, ox), ny = TOps.Add(y, oy), nz = TOps.Add(z, oz);
        var zero = TOps.Broadcast(0.0);
        var wall = _field.Wall(nx, ny, nz);
        var inside = TOps.LessOrEqual(zero, wall);
        var e = _field.Energy(TOps.Select(inside, nx, x), TOps.Select(inside, ny, y), TOps.Select(inside, nz, z));
        LaneFaultCheck.Note<TOps, TD, TB>(ref state.Faults, nx, e);
        // Σ over the two links of |new − neighbour|² − |old − neighbour|², then × −1/(2σ²) = −(2/σ²)/4.
        TD bx = _bead[3 * before], by = _bead[3 * before + 1], bz = _bead[3 * before + 2];
        TD cx = _bead[3 * after], cy = _bead[3 * after + 1], cz = _bead[3 * after + 2];
        var springs = TOps.Subtract(TOps.Add(Square(nx, ny, nz, bx, by, bz), Square(nx, ny, nz, cx, cy, cz)),
            TOps.Add(Square(x, y, z, bx, by, bz), Square(x, y, z, cx, cy, cz)));
        var exponent = TOps.Add(TOps.Multiply(state.NegativeBetaPerBead, TOps.Subtract(e, _energy[k])),
            TOps.Multiply(TOps.Multiply(TOps.Broadcast(-0.25), state.TwoOverSpreadSquared), springs));
        var ratio = LaneMath.Exp<TOps, TD, TB>(exponent);
        var threshold = u;
        var nearest = Min(Min(wall, _wall[k]), Min(_wall[before], _wall[after]));
        if (!FarFromAllWalls(nearest, state.TwoOverSpreadSquared))
        {
            (_trialWall[before], _trialWall[k], _trialWall[after]) = (_wall[before], wall, _wall[after]);
            ratio = TOps.Multiply(ratio, ImageProduct(_trialWall, before, 2, _beads, state.TwoOverSpreadSquared));
            threshold = TOps.Multiply(u, ImageProduct(_wall, before, 2, _beads, state.TwoOverSpreadSquared));
        }
        var accept = TOps.And(inside, TOps.LessThan(threshold, ratio));
        (_trial[3 * k], _trial[3 * k + 1], _trial[3 * k + 2]) = (nx, ny, nz);
        _trialEnergy[k] = e;
        _trialWall[k] = wall;
        Take(accept, k);
    }

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static TD Square(TD x, TD y, TD z, TD ax, TD ay, TD az)
    {
        var dx = TOps.Subtract(x, ax);
        var dy = TOps.Subtract(y, ay);
        var dz = TOps.Subtract(z, az);
        return TOps.MultiplyAdd(dx, dx, TOps.MultiplyAdd(dy, dy, TOps.Multiply(dz, dz)));
    }

    /// <summary>Bead k takes its trial position, energy and wall distance where <paramref name="accept"/> holds.</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private void Take(TD accept, int k)
    {
        _bead[3 * k] = TOps.Select(accept, _trial[3 * k], _bead[3 * k]);
        _bead[3 * k + 1] = TOps.Select(accept, _trial[3 * k + 1], _bead[3 * k + 1]);
        _bead[3 * k + 2] = TOps.Select(accept, _trial[3 * k + 2], _bead[3 * k + 2]);
        _energy[k] = TOps.Select(accept, _trialEnergy[k], _energy[k]);
        _wall[k] = TOps.Select(accept, _trialWall[k], _wall[k]);
    }

    /// <summary>One standard normal deviate per lane; Box–Muller gives them in pairs, and the second waits in <paramref name="spare"/>.</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static TD Gaussian(ref RingState<TD, TB> state, ref TD spare, ref bool haveSpare)
    {
        if (haveSpare)
        {
            haveSpare = false;
            return spare;
        }
        haveSpare = true;
        return LaneMath.NextGaussianPair<TOps, TD, TB>(ref state.R0, ref state.R1, ref state.R2, ref state.R3, out spare);
    }

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static TD Min(TD a, TD b) => TOps.Select(TOps.LessThan(a, b), a, b);

    /// <summary>Whether 2d²/σ² exceeds <see cref="FarFromWalls"/> in every lane for the nearest bead of the move.</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static bool FarFromAllWalls(TD nearest, TD twoOverSpreadSquared)
        => TOps.AllTrue(TOps.LessThan(TOps.Broadcast(FarFromWalls), TOps.Multiply(TOps.Multiply(nearest, nearest), twoOverSpreadSquared)))
            && TOps.AllTrue(TOps.LessThan(TOps.Broadcast(0.0), nearest));

    /// <summary>Π over the <paramref name="links"/> links from bead <paramref name="first"/> of 1 − e^(−2 d_k d_{k+1}/σ²) (the links' image factors; 0 where a bead is outside).</summary>
    private static TD ImageProduct(TD[] wall, int first, int links, int beads, TD twoOverSpreadSquared)
    {
        var zero = TOps.Broadcast(0.0);
        var one = TOps.Broadcast(1.0);
        var product = one;
        for (int i = 0; i < links; i++)
        {
            var da = wall[(first + i) % beads];
            var db = wall[(first + i + 1) % beads];
            var factor = TOps.Subtract(one, LaneMath.Exp<TOps, TD, TB>(TOps.Multiply(TOps.Broadcast(-1.0), TOps.Multiply(TOps.Multiply(da, db), twoOverSpreadSquared))));
            var bothInside = TOps.And(TOps.LessOrEqual(zero, da), TOps.LessOrEqual(zero, db));
            product = TOps.Multiply(product, TOps.Select(bothInside, factor, zero));
        }
        return product;
    }
}

/// <summary>The ring walk's state in every lane: the recorded bead (point and energy), −β, −β/P, σ = √(βħ²/(mP)) and 2/σ²,
/// the kinetic-energy sums, the random stream, fault notes, the step count, the kinetic values counted and whether recording (saved word for word in this order; the beads themselves are the
/// walk's RINGB, RINGE and RINGW sections).</summary>
[StructLayout(LayoutKind.Sequential)]
internal struct RingState<TD, TB>
    where TD : struct
    where TB : struct
{
    internal TD X, Y, Z, Energy, NegativeBeta, NegativeBetaPerBead, Spread, TwoOverSpreadSquared, KineticSum, KineticSquares;
    internal TB R0, R1, R2, R3;
    internal LaneFaults<TD> Faults;
    internal long Turn, KineticCount, Recording;
}

/// <summary>A line between hard walls at the window's ends: V(x), distance min(x − lower, upper − x).</summary>
internal readonly struct LineField<TOps, TD, TB, TPotential>(TPotential potential, double lower, double upper) : IBeadField<TD>
    where TOps : struct, ILaneOps<TD, TB>
    where TD : struct
    where TB : struct
    where TPotential : struct, IPairPotential
{
    public int Dimensions => 1;

    public string Description => potential.Description;

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public TD Energy(TD x, TD y, TD z) => potential.LaneEnergy<TOps, TD, TB>(x);

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public TD Wall(TD x, TD y, TD z)
    {
        var below = TOps.Subtract(x, TOps.Broadcast(lower));
        var above = TOps.Subtract(TOps.Broadcast(upper), x);
        return TOps.Select(TOps.LessThan(below, above), below, above);
    }

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public void Recorded(TD x, TD y, TD z, out TD rx, out TD ry, out TD rz) => (rx, ry, rz) = (x, x, x);
}

/// <summary>
/// A radial pair as what it is, the relative vector r in three dimensions with V(|r|), between spherical walls at the
/// window's ends (no inner wall when the window starts at 0); the records see |r|.
/// </summary>
internal readonly struct RadialField<TOps, TD, TB, TPotential>(TPotential potential, double lower, double upper) : IBeadField<TD>
    where TOps : struct, ILaneOps<TD, TB>
    where TD : struct
    where TB : struct
    where TPotential : struct, IPairPotential
{
    public int Dimensions => 3;

    public string Description => potential.Description;

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static TD Length(TD x, TD y, TD z) => TOps.Sqrt(TOps.MultiplyAdd(x, x, TOps.MultiplyAdd(y, y, TOps.Multiply(z, z))));

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public TD Energy(TD x, TD y, TD z) => potential.LaneEnergy<TOps, TD, TB>(Length(x, y, z));

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public TD Wall(TD x, TD y, TD z)
    {
        var r = Length(x, y, z);
        var above = TOps.Subtract(TOps.Broadcast(upper), r);
        if (lower <= 0)
        {
            return above;
        }
        var below = TOps.Subtract(r, TOps.Broadcast(lower));
        return TOps.Select(TOps.LessThan(below, above), below, above);
    }

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public void Recorded(TD x, TD y, TD z, out TD rx, out TD ry, out TD rz)
    {
        rx = Length(x, y, z);
        (ry, rz) = (rx, rx);
    }
}

/// <summary>A particle among fixed sites inside the site's confinement: Σ V(|p − site|²) and the distance to the confinement's wall.</summary>
internal readonly struct SiteField<TOps, TD, TB, TPotential> : IBeadField<TD>
    where TOps : struct, ILaneOps<TD, TB>
    where TD : struct
    where TB : struct
    where TPotential : struct, IPairPotential
{
    private readonly TPotential[] _potentials;
    private readonly int[] _ends;
    private readonly double[] _sites;
    private readonly double _size, _cx, _cy, _cz;
    private readonly bool _sphere;

    private readonly LaneField<TOps, TD, TB> _field;

    internal SiteField(TPotential[] potentials, int[] ends, double[] sites, Confinement confinement, Position centre, PolynomialField? field = null)
    {
        _field = new LaneField<TOps, TD, TB>(field);
        _potentials = potentials;
        _ends = ends;
        _sites = sites;
        _size = confinement.SizeInAngstroms;
        _sphere = confinement.Shape == ConfinementShape.Sphere;
        (_cx, _cy, _cz) = (centre.X, centre.Y, centre.Z);
    }

    public int Dimensions => 3;

    public string Description => _potentials[0].Description;

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public TD Energy(TD x, TD y, TD z)
    {
        var e = SiteSums.Energy<TOps, TD, TB, TPotential>(_potentials, _ends, _sites, x, y, z);
        return _field.IsEmpty ? e : TOps.Add(e, _field.Value(x, y, z));
    }

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public TD Wall(TD x, TD y, TD z)
    {
        var dx = TOps.Subtract(x, TOps.Broadcast(_cx));
        var dy = TOps.Subtract(y, TOps.Broadcast(_cy));
        var dz = TOps.Subtract(z, TOps.Broadcast(_cz));
        if (_sphere)
        {
            return TOps.Subtract(TOps.Broadcast(_size), TOps.Sqrt(TOps.MultiplyAdd(dx, dx, TOps.MultiplyAdd(dy, dy, TOps.Multiply(dz, dz)))));
        }
        var ax = TOps.Abs(dx);
        var ay = TOps.Abs(dy);
        var az = TOps.Abs(dz);
        var largest = TOps.Select(TOps.LessThan(ax, ay), ay, ax);
        largest = TOps.Select(TOps.LessThan(largest, az), az, largest);
        return TOps.Subtract(TOps.Broadcast(_size), largest);
    }

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public void Recorded(TD x, TD y, TD z, out TD rx, out TD ry, out TD rz) => (rx, ry, rz) = (x, y, z);
}
