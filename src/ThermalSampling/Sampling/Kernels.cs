using System;
using System.Runtime.CompilerServices;
using ThermalSampling.Potentials;
using ThermalSampling.Randomness;

namespace ThermalSampling.Sampling;

/// <summary>The state of a pair chain: the separation and its log Boltzmann weight.</summary>
/// <param name="Separation">r, Å.</param>
/// <param name="LogWeight">−V(r)/kT + n ln r (n = 0 line, 2 radial).</param>
public readonly record struct PairChainState(double Separation, double LogWeight);

/// <summary>
/// One random-walk Metropolis step for a line or radial pair: propose r' = r + w·N(0, 1); reject outside the window or
/// where V = +∞; accept with probability min(1, e^(logW(r') − logW(r))). Immutable; specialised per potential type.
/// </summary>
/// <typeparam name="TPotential">The potential, a struct so that the energy call inlines.</typeparam>
public readonly struct PairMetropolisKernel<TPotential> : IMetropolisStep<PairChainState> where TPotential : struct, IPairPotential
{
    private readonly TPotential _potential;
    private readonly double _lower, _upper, _beta;
    private readonly bool _radial;
    private readonly string _description;

    /// <summary>Creates the kernel.</summary>
    /// <param name="potential">The pair potential.</param>
    /// <param name="lower">Lower wall, Å.</param>
    /// <param name="upper">Upper wall, Å.</param>
    /// <param name="beta">1/kT, 1/eV.</param>
    /// <param name="radial">Whether the r² Jacobian applies.</param>
    public PairMetropolisKernel(TPotential potential, double lower, double upper, double beta, bool radial)
    {
        _potential = potential;
        _lower = lower;
        _upper = upper;
        _beta = beta;
        _radial = radial;
        _description = potential.Description;
    }

    /// <summary>The log weight at <paramref name="r"/> (−∞ outside the window or on a hard core).</summary>
    /// <param name="r">The separation, Å.</param>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public double LogWeight(double r)
    {
        if (!(r >= _lower && r <= _upper))
        {
            return double.NegativeInfinity;
        }
        double v = _potential.Energy(r);
        if (double.IsNaN(v) || double.IsNegativeInfinity(v))
        {
            throw new NonFiniteEnergyException(r, v, _description);
        }
        double lw = -_beta * v;
        return _radial ? lw + 2 * Math.Log(r) : lw;
    }

    /// <summary>The state at separation <paramref name="r"/>.</summary>
    /// <param name="r">The separation, Å, inside the window.</param>
    public PairChainState StateAt(double r) => new(r, LogWeight(r));

    /// <summary>One step.</summary>
    /// <param name="state">The current state.</param>
    /// <param name="width">The proposal width, Å.</param>
    /// <param name="random">The chain's random stream.</param>
    /// <param name="accepted">Whether the proposal was accepted.</param>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public PairChainState Step(in PairChainState state, double width, ref RandomStream random, out bool accepted)
    {
        double proposal = state.Separation + width * random.NextStandardNormal();
        double lw = LogWeight(proposal);
        double delta = lw - state.LogWeight;
        accepted = delta >= 0 || random.NextUnitInterval() < Math.Exp(delta);
        return accepted ? new PairChainState(proposal, lw) : state;
    }
}
