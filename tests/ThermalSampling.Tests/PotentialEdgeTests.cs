using System;
using System.Linq;
using ThermalSampling.Potentials;
using ThermalSampling.Units;
using Xunit;

namespace ThermalSampling.Tests;

/// <summary>
/// Direct checks of the potentials' wells, barriers, argument checks and numerical fallbacks that the physics tests reach
/// only indirectly (each was a surviving mutant, docs/validation.md). References are independent: brute-force grids,
/// closed forms, and the analytic derivatives of the function a table or delegate was built from.
/// </summary>
public sealed class PotentialEdgeTests
{
    /// <summary>The lowest point of <paramref name="f"/> on a dense grid, refined by golden-section search (independent of the library's root finding).</summary>
    private static (double R, double V) GridMinimum(Func<double, double> f, double lo, double hi)
    {
        const int n = 20_000;
        int best = 0;
        for (int i = 1; i <= n; i++)
        {
            if (f(lo + (hi - lo) * i / n) < f(lo + (hi - lo) * best / n))
            {
                best = i;
            }
        }
        double a = lo + (hi - lo) * Math.Max(best - 1, 0) / n, b = lo + (hi - lo) * Math.Min(best + 1, n) / n;
        double g = (Math.Sqrt(5) - 1) / 2;
        for (int k = 0; k < 200; k++)
        {
            double c = b - g * (b - a), d = a + g * (b - a);
            if (f(c) < f(d))
            {
                b = d;
            }
            else
            {
                a = c;
            }
        }
        double r = 0.5 * (a + b);
        return (r, f(r));
    }

    [Fact]
    public void Buckingham_well_and_barrier_match_a_brute_force_search()
    {
        // O–O parameters of Lewis & Catlow (1985), recalled from memory (as in Sources.Buckingham).
        var b = new Buckingham(Energy.FromElectronVolts(22764.0), Length.FromAngstroms(0.149), 27.88);
        double V(double r) => 22764.0 * Math.Exp(-r / 0.149) - 27.88 / Math.Pow(r, 6);
        var (rMin, vMin) = GridMinimum(V, 1.0, 6.0); // the barrier is near 0.87 Å, the (spurious) minimum near 1.24 Å
        var well = b.Well!;
        Assert.Equal(rMin, well.EquilibriumDistanceInAngstroms, 1e-6);
        Assert.Equal(vMin, well.MinimumEnergyInElectronVolts, 1e-12);
        Assert.True(well.MinimumEnergyInElectronVolts < 0);
        Assert.Equal(-vMin, well.WellDepthInElectronVolts, 1e-12);
        // The barrier is the maximum of V below the minimum: the negative of the minimum of −V.
        var (rBarrier, minusVBarrier) = GridMinimum(r => -V(r), 0.3, rMin);
        Assert.Equal(rBarrier, b.BarrierDistanceInAngstroms, 1e-6);
        Assert.Equal(-minusVBarrier, b.BarrierEnergyInElectronVolts, 1e-9 * Math.Abs(minusVBarrier));
        Assert.Equal(b.BarrierDistanceInAngstroms, b.DomainLower);

        var pureRepulsion = new Buckingham(Energy.FromElectronVolts(1000), Length.FromAngstroms(0.3), 0);
        Assert.Equal(double.PositiveInfinity, pureRepulsion.BarrierEnergyInElectronVolts);
        Assert.Null(pureRepulsion.Well);
        Assert.Equal(0, pureRepulsion.DomainLower);
    }

    [Fact]
    public void Buckingham_with_a_barely_positive_balance_still_finds_its_minimum()
    {
        // (A/ρ)(7ρ)⁷e⁻⁷ just above 6C: the barrier and the minimum sit close to 7ρ on either side (invented parameters).
        double a = 100, rho = 0.25, peak = 7 * rho;
        double c = a / rho * Math.Pow(peak, 7) * Math.Exp(-7) / 6 * 0.999;
        var b = new Buckingham(Energy.FromElectronVolts(a), Length.FromAngstroms(rho), c);
        double V(double r) => a * Math.Exp(-r / rho) - c / Math.Pow(r, 6);
        var (rMin, vMin) = GridMinimum(V, peak, 3 * peak);
        Assert.Equal(rMin, b.Well!.EquilibriumDistanceInAngstroms, 1e-5);
        Assert.Equal(vMin, b.Well.MinimumEnergyInElectronVolts, 1e-12);
        Assert.InRange(b.BarrierDistanceInAngstroms, 0.9 * peak, peak);
        var none = Assert.Throws<ArgumentException>(() => new Buckingham(Energy.FromElectronVolts(a), Length.FromAngstroms(rho), c / 0.999 * 1.001));
        Assert.Contains("no barrier and no minimum", none.Message);
    }

    [Fact]
    public void Derivative_sets_add_term_by_term()
    {
        var a = new PairDerivatives(1, 2, 3, 4, 5);
        var b = new PairDerivatives(10, 20, 30, 40, 50);
        var s = a + b;
        Assert.Equal((11.0, 22.0, 33.0, 44.0, 55.0), (s.Energy, s.First, s.Second, s.Third, s.Fourth));
    }

    [Fact]
    public void Lennard_Jones_from_its_minimum_refuses_non_positive_values()
    {
        Assert.Equal("equilibriumDistance", Assert.Throws<ArgumentOutOfRangeException>(() => LennardJones.FromMinimum(Length.FromAngstroms(-1), Energy.FromElectronVolts(0.01))).ParamName);
        Assert.Equal("wellDepth", Assert.Throws<ArgumentOutOfRangeException>(() => LennardJones.FromMinimum(Length.FromAngstroms(3), Energy.FromElectronVolts(0))).ParamName);
    }

    [Fact]
    public void Morse_well_lies_at_minus_the_depth()
    {
        var m = new Morse(Energy.FromElectronVolts(0.4174), 1.3885, Length.FromAngstroms(2.845)); // Girifalco & Weizer 1959 (Fe)
        Assert.Equal((2.845, -0.4174, 0.4174), (m.Well!.EquilibriumDistanceInAngstroms, m.Well.MinimumEnergyInElectronVolts, m.Well.WellDepthInElectronVolts));
        Assert.Equal(-0.4174, m.Energy(2.845), 1e-15);
    }

    [Fact]
    public void A_delegate_potential_checks_its_domain_and_never_calls_outside_it()
    {
        static double Quadratic(double r) => r < 1 || r > 3 ? throw new InvalidOperationException($"called at {r}") : 0.5 * (r - 2.2) * (r - 2.2) - 1;
        Assert.Equal("domainLower", Assert.Throws<ArgumentOutOfRangeException>(() => new FunctionPotential(Quadratic, Length.FromAngstroms(-0.5), Length.FromAngstroms(3))).ParamName);
        Assert.Equal("domainUpper", Assert.ThrowsAny<ArgumentException>(() => new FunctionPotential(Quadratic, Length.FromAngstroms(3), Length.FromAngstroms(1))).ParamName);
        var f = new FunctionPotential(Quadratic, Length.FromAngstroms(1), Length.FromAngstroms(3));
        Assert.Equal("user-supplied potential", f.Description);
        Assert.Equal(2.2, f.Well!.EquilibriumDistanceInAngstroms, 1e-7);
        Assert.Equal(-1, f.Well.MinimumEnergyInElectronVolts, 1e-12);
        Assert.Equal(Quadratic(3) - Quadratic(2.2), f.Well.WellDepthInElectronVolts, 1e-9); // depth measured to the domain's upper end
        Assert.Equal("invented", new FunctionPotential(Quadratic, Length.FromAngstroms(1), Length.FromAngstroms(3), description: "invented").Description);
    }

    [Fact]
    public void A_delegate_potential_with_its_minimum_close_to_the_domain_end_is_still_found()
    {
        // The well search keeps 4·10⁻⁴ of the domain clear of each end; a minimum just inside that is found, one outside is not.
        var inside = new FunctionPotential(r => (r - 2.999) * (r - 2.999), Length.FromAngstroms(1), Length.FromAngstroms(3));
        Assert.Equal(2.999, inside.Well!.EquilibriumDistanceInAngstroms, 1e-7);
        var outside = new FunctionPotential(r => (r - 2.9997) * (r - 2.9997), Length.FromAngstroms(1), Length.FromAngstroms(3));
        Assert.Null(outside.Well);
    }

    [Fact]
    public void A_delegate_potentials_finite_differences_stay_in_the_domain_and_stay_accurate_at_its_ends()
    {
        // V = 0.5·k·(r − 1.5)² + c·(r − 1.5)³ on [1, 2], a delegate that refuses to be called outside its domain; the exact
        // derivatives are written out (invented parameters).
        static double V(double r) => r < 1 || r > 2 ? throw new InvalidOperationException($"called at {r:R}") : 2.0 * (r - 1.5) * (r - 1.5) + 0.3 * Math.Pow(r - 1.5, 3);
        var f = new FunctionPotential(V, Length.FromAngstroms(1), Length.FromAngstroms(2));
        foreach (double r in new[] { 1.0, 1.0005, 1.01, 1.5, 1.99, 2.0 })
        {
            double x = r - 1.5;
            var d = f.Derivatives(r);
            Assert.Equal(4.0 * x + 0.9 * x * x, d.First, 1e-8);
            Assert.Equal(4.0 + 1.8 * x, d.Second, 1e-6);
            Assert.Equal(1.8, d.Third, 1e-3);
            Assert.Equal(0, d.Fourth, 2e-2);
        }
    }

    [Fact]
    public void A_table_checks_its_arguments_and_names_the_offending_entry()
    {
        double[] r = [1, 2, 3, 4, 5], v = [1, 0, -1, 0, 1];
        Assert.Equal("separationsAngstrom", Assert.Throws<ArgumentNullException>(() => new TabulatedPotential(null!, v)).ParamName);
        Assert.Equal("energiesElectronVolt", Assert.Throws<ArgumentNullException>(() => new TabulatedPotential(r, null!)).ParamName);
        Assert.Equal("separationsAngstrom[0]", Assert.Throws<ArgumentOutOfRangeException>(() => new TabulatedPotential([-1, 2, 3, 4, 5], v)).ParamName);
        var unsorted = Assert.Throws<ArgumentException>(() => new TabulatedPotential([1, 2, 2.5, 2.4, 5], v));
        Assert.StartsWith("separationsAngstrom[3] = 2.4 is not greater than separationsAngstrom[2] = 2.5;", unsorted.Message);
    }

    [Fact]
    public void A_tables_derivatives_approach_those_of_the_function_it_samples()
    {
        // A Morse curve (Girifalco & Weizer 1959, Fe) tabulated every 0.01 Å on [2.0, 4.0]; the spline's V, V′, V″ and the
        // stencil estimates of V‴ and V⁗ against the analytic values, away from the natural ends.
        var m = new Morse(Energy.FromElectronVolts(0.4174), 1.3885, Length.FromAngstroms(2.845));
        var r = Enumerable.Range(0, 201).Select(i => 2.0 + 0.01 * i).ToArray();
        var table = new TabulatedPotential(r, r.Select(m.Energy).ToArray());
        foreach (double x in new[] { 2.505, 2.845, 3.3 })
        {
            var exact = m.Derivatives(x);
            var t = table.Derivatives(x);
            Assert.Equal(exact.Energy, t.Energy, 1e-6);
            Assert.Equal(exact.First, t.First, 1e-4);
            Assert.Equal(exact.Second, t.Second, 2e-3 * Math.Abs(exact.Second) + 1e-4);
            Assert.Equal(exact.Third, t.Third, 0.03 * Math.Abs(exact.Third));
            Assert.Equal(exact.Fourth, t.Fourth, 0.15 * Math.Abs(exact.Fourth));
        }
        Assert.Equal(2.845, table.Well!.EquilibriumDistanceInAngstroms, 1e-4);
        Assert.Equal(m.Energy(4.0) - table.Well.MinimumEnergyInElectronVolts, table.Well.WellDepthInElectronVolts, 1e-12);
    }

    [Fact]
    public void Cut_off_wrappers_keep_a_well_only_strictly_inside_the_cut_off()
    {
        var lj = LennardJones.FromMinimum(Length.FromAngstroms(3.0), Energy.FromElectronVolts(0.01));
        Assert.Null(new CutOffPotential<LennardJones>(lj, Length.FromAngstroms(3.0)).Well);
        Assert.Null(new ShiftedCutOffPotential<LennardJones>(lj, Length.FromAngstroms(3.0)).Well);
        Assert.NotNull(new CutOffPotential<LennardJones>(lj, Length.FromAngstroms(3.0001)).Well);
        Assert.NotNull(new ShiftedCutOffPotential<LennardJones>(lj, Length.FromAngstroms(3.0001)).Well);
    }

    [Fact]
    public void A_sum_lives_on_the_overlap_of_its_terms_domains_and_finds_the_well_of_the_sum()
    {
        var lj = LennardJones.FromMinimum(Length.FromAngstroms(3.0), Energy.FromElectronVolts(0.01));
        var narrow = new FunctionPotential(r => 0.002 * r, Length.FromAngstroms(2.0), Length.FromAngstroms(6.0));
        var sum = new SumPotential<LennardJones, FunctionPotential>(lj, narrow);
        Assert.Equal((2.0, 6.0), (sum.DomainLower, sum.DomainUpper));
        var (rMin, vMin) = GridMinimum(r => lj.Energy(r) + 0.002 * r, 2.5, 4.0);
        Assert.Equal(rMin, sum.Well!.EquilibriumDistanceInAngstroms, 1e-6);
        Assert.Equal(vMin, sum.Well.MinimumEnergyInElectronVolts, 1e-12);
        Assert.Equal(sum.Energy(6.0) - vMin, sum.Well.WellDepthInElectronVolts, 1e-12); // a finite domain: depth to its upper end
        var disjoint = new FunctionPotential(r => r, Length.FromAngstroms(7.0), Length.FromAngstroms(8.0));
        Assert.Contains("do not overlap", Assert.Throws<ArgumentException>(() => new SumPotential<FunctionPotential, FunctionPotential>(narrow, disjoint)).Message);

        // Two wells without a stated one: the default search runs from 0.2 × the smaller to 5 × the larger well distance.
        var far = LennardJones.FromMinimum(Length.FromAngstroms(9.0), Energy.FromElectronVolts(0.05));
        var twoWells = new SumPotential<LennardJones, LennardJones>(lj, far);
        var (rDeep, vDeep) = GridMinimum(r => lj.Energy(r) + far.Energy(r), 7.0, 12.0);
        Assert.Equal(rDeep, twoWells.Well!.EquilibriumDistanceInAngstroms, 1e-5);
        Assert.Equal(vDeep, twoWells.Well.MinimumEnergyInElectronVolts, 1e-12);
        Assert.Equal(twoWells.Energy(1e4 * 9.0) - vDeep, twoWells.Well.WellDepthInElectronVolts, 1e-12); // an open domain: depth to 10⁴ × the larger well distance
    }

    [Fact]
    public void The_well_locator_keeps_the_lowest_of_several_minima_and_a_minimum_on_a_scan_point()
    {
        // cos(2πr) on [0, 3] has minima at 0.5, 1.5, 2.5; tilted by 0.01r the first is the lowest.
        double V(double r) => Math.Cos(2 * Math.PI * r) + 0.01 * r;
        double D(double r) => -2 * Math.PI * Math.Sin(2 * Math.PI * r) + 0.01;
        double? found = WellLocator.FindLowestMinimum(V, D, 0, 3, 300);
        Assert.Equal(GridMinimum(V, 0.2, 0.8).R, found!.Value, 1e-9);
        // Equal minima: the first one found is kept.
        Assert.Equal(0.5, WellLocator.FindLowestMinimum(r => Math.Cos(2 * Math.PI * r), r => -2 * Math.PI * Math.Sin(2 * Math.PI * r), 0.1, 2.9, 280)!.Value, 1e-9);
        // A minimum exactly on a scan point (V′ = 0 there) and at the last scan point.
        Assert.Equal(1.0, WellLocator.FindLowestMinimum(r => (r - 1) * (r - 1), r => 2 * (r - 1), 0, 2, 4)!.Value);
        Assert.Equal(2.0, WellLocator.FindLowestMinimum(r => (r - 2) * (r - 2), r => 2 * (r - 2), 0, 2, 4)!.Value);
        // Non-finite slopes are skipped, never taken for a sign change.
        Assert.Null(WellLocator.FindLowestMinimum(r => 1 / r, r => r < 1 ? double.NaN : -1 / (r * r), 0, 2, 10));
        Assert.Equal(1.5, WellLocator.FindLowestMinimum(r => (r - 1.5) * (r - 1.5), r => r < 1 ? double.NegativeInfinity : 2 * (r - 1.5), 0, 3, 7)!.Value, 1e-9);
    }

    [Fact]
    public void A_non_finite_energy_error_says_so_when_its_separation_is_not_known()
    {
        var known = new NonFiniteEnergyException(1.25, double.NaN, "invented");
        Assert.Equal("The potential 'invented' returned NaN at r = 1.25 Å; energies must be finite inside the window.", known.Message);
        var unknown = new NonFiniteEnergyException(double.NaN, double.NegativeInfinity, "invented");
        Assert.True(double.IsNaN(unknown.Separation));
        Assert.Equal(double.NegativeInfinity, unknown.ReturnedEnergy);
        Assert.DoesNotContain("r = ", unknown.Message, StringComparison.Ordinal);
        Assert.Contains("could not be recovered", unknown.Message, StringComparison.Ordinal);
        Assert.StartsWith("The potential 'invented' returned -Infinity at a separation", unknown.Message, StringComparison.Ordinal);
    }
}
