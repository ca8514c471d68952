using System;
using System.Runtime.CompilerServices;
using System.Runtime.Intrinsics;

namespace ThermalSampling.Numerics;

// Stryker disable all : vector-lane kernel, in no mutation mode (eng/mutation-testing.sh); LaneKernelTests checks it bit for bit
/// <summary>
/// The arithmetic a lane kernel needs, over <typeparamref name="TD"/> (one double per chain) and <typeparamref name="TB"/>
/// (64 raw bits per chain). Implemented for Vector512, Vector256, Vector128 and a plain double, so one kernel body runs
/// 8, 4, 2 or 1 chains in lockstep. Every operation is exactly rounded IEEE arithmetic (add, multiply, divide, fused
/// multiply-add) or exact bit manipulation, and comparisons never see a NaN, so each lane computes bit for bit what
/// the one-lane version computes: results never depend on the width the hardware picks.
/// </summary>
/// <remarks>
/// Written by hand rather than through a library because it is the per-step loop; the generic static-abstract form lets
/// the JIT specialise and inline each width with no calls left (.NET's own ISimdVector interface is not public).
/// Masks are values of <typeparamref name="TD"/> with all bits set where true.
/// </remarks>
/// <typeparam name="TD">Doubles, one per lane.</typeparam>
/// <typeparam name="TB">Raw 64-bit words, one per lane.</typeparam>
public interface ILaneOps<TD, TB>
    where TD : struct
    where TB : struct
{
    /// <summary>The number of lanes.</summary>
    static abstract int Count { get; }

    /// <summary>Whether the hardware runs this width natively.</summary>
    static abstract bool IsHardwareAccelerated { get; }

    /// <summary><paramref name="x"/> in every lane.</summary>
    static abstract TD Broadcast(double x);

    /// <summary>a + b per lane.</summary>
    static abstract TD Add(TD a, TD b);

    /// <summary>a − b per lane.</summary>
    static abstract TD Subtract(TD a, TD b);

    /// <summary>a · b per lane.</summary>
    static abstract TD Multiply(TD a, TD b);

    /// <summary>a / b per lane.</summary>
    static abstract TD Divide(TD a, TD b);

    /// <summary>√a per lane (correctly rounded).</summary>
    static abstract TD Sqrt(TD a);

    /// <summary>|a| per lane.</summary>
    static abstract TD Abs(TD a);

    /// <summary>The bitwise or of two masks (or of the bits of two doubles).</summary>
    static abstract TD Or(TD a, TD b);

    /// <summary>a·b + c with one rounding.</summary>
    static abstract TD MultiplyAdd(TD a, TD b, TD c);

    /// <summary>A mask: all bits set where a &lt; b.</summary>
    static abstract TD LessThan(TD a, TD b);

    /// <summary>A mask: all bits set where a ≤ b.</summary>
    static abstract TD LessOrEqual(TD a, TD b);

    /// <summary>A mask: all bits set where a &gt; b.</summary>
    static abstract TD GreaterThan(TD a, TD b);

    /// <summary>The bitwise and of two masks (or of a mask and a value).</summary>
    static abstract TD And(TD a, TD b);

    /// <summary>Per lane: <paramref name="ifTrue"/> where <paramref name="mask"/> is set, else <paramref name="ifFalse"/>.</summary>
    static abstract TD Select(TD mask, TD ifTrue, TD ifFalse);

    /// <summary>Whether every lane of <paramref name="mask"/> is set.</summary>
    static abstract bool AllTrue(TD mask);

    /// <summary>The value in lane <paramref name="lane"/>.</summary>
    static abstract double Get(TD v, int lane);

    /// <summary><paramref name="v"/> with lane <paramref name="lane"/> replaced by <paramref name="x"/>.</summary>
    static abstract TD Set(TD v, int lane, double x);

    /// <summary>Writes the lanes to <paramref name="destination"/>[0 … Count − 1].</summary>
    static abstract void Store(TD v, ref double destination);

    /// <summary>a xor b per lane.</summary>
    static abstract TB Xor(TB a, TB b);

    /// <summary>a or b per lane.</summary>
    static abstract TB Or(TB a, TB b);

    /// <summary>a and b per lane.</summary>
    static abstract TB AndBits(TB a, TB b);

    /// <summary>a + b per lane, modulo 2^64.</summary>
    static abstract TB AddBits(TB a, TB b);

    /// <summary>a shifted left by <paramref name="count"/> bits per lane.</summary>
    static abstract TB ShiftLeft(TB a, int count);

    /// <summary>a shifted right (logical) by <paramref name="count"/> bits per lane.</summary>
    static abstract TB ShiftRight(TB a, int count);

    /// <summary><paramref name="x"/> in every lane.</summary>
    static abstract TB BroadcastBits(ulong x);

    /// <summary>Each lane truncated toward zero to a 64-bit integer (the lanes must be in [0, 2^53)).</summary>
    static abstract TB Truncate(TD a);

    /// <summary>Writes the words to <paramref name="destination"/>[0 … Count − 1].</summary>
    static abstract void StoreBits(TB v, ref ulong destination);

    /// <summary>The bits of each lane read as a double.</summary>
    static abstract TD BitsAsDouble(TB a);

    /// <summary>The bits of each lane's double.</summary>
    static abstract TB DoubleAsBits(TD a);

    /// <summary>The word in lane <paramref name="lane"/>.</summary>
    static abstract ulong GetBits(TB v, int lane);

    /// <summary><paramref name="v"/> with lane <paramref name="lane"/> replaced by <paramref name="x"/>.</summary>
    static abstract TB SetBits(TB v, int lane, ulong x);
}

// Stryker disable all : vector-lane kernel, in no mutation mode (eng/mutation-testing.sh); LaneKernelTests checks it bit for bit
/// <summary>Eight lanes in a 512-bit register.</summary>
public readonly struct Lanes8 : ILaneOps<Vector512<double>, Vector512<ulong>>
{
    /// <inheritdoc/>
    public static int Count => 8;
    /// <inheritdoc/>
    public static bool IsHardwareAccelerated => Vector512.IsHardwareAccelerated;
    /// <inheritdoc/>
    public static Vector512<double> Broadcast(double x) => Vector512.Create(x);
    /// <inheritdoc/>
    public static Vector512<double> Add(Vector512<double> a, Vector512<double> b) => a + b;
    /// <inheritdoc/>
    public static Vector512<double> Subtract(Vector512<double> a, Vector512<double> b) => a - b;
    /// <inheritdoc/>
    public static Vector512<double> Multiply(Vector512<double> a, Vector512<double> b) => a * b;
    /// <inheritdoc/>
    public static Vector512<double> Divide(Vector512<double> a, Vector512<double> b) => a / b;
    /// <inheritdoc/>
    public static Vector512<double> Sqrt(Vector512<double> a) => Vector512.Sqrt(a);
    /// <inheritdoc/>
    public static Vector512<double> Abs(Vector512<double> a) => Vector512.Abs(a);
    /// <inheritdoc/>
    public static Vector512<double> Or(Vector512<double> a, Vector512<double> b) => a | b;
    /// <inheritdoc/>
    public static Vector512<double> MultiplyAdd(Vector512<double> a, Vector512<double> b, Vector512<double> c) => Vector512.FusedMultiplyAdd(a, b, c);
    /// <inheritdoc/>
    public static Vector512<double> LessThan(Vector512<double> a, Vector512<double> b) => Vector512.LessThan(a, b);
    /// <inheritdoc/>
    public static Vector512<double> LessOrEqual(Vector512<double> a, Vector512<double> b) => Vector512.LessThanOrEqual(a, b);
    /// <inheritdoc/>
    public static Vector512<double> GreaterThan(Vector512<double> a, Vector512<double> b) => Vector512.GreaterThan(a, b);
    /// <inheritdoc/>
    public static Vector512<double> And(Vector512<double> a, Vector512<double> b) => a & b;
    /// <inheritdoc/>
    public static Vector512<double> Select(Vector512<double> mask, Vector512<double> ifTrue, Vector512<double> ifFalse) => Vector512.ConditionalSelect(mask, ifTrue, ifFalse);
    /// <inheritdoc/>
    public static bool AllTrue(Vector512<double> mask) => Vector512.ExtractMostSignificantBits(mask) == 0xFFUL;
    /// <inheritdoc/>
    public static double Get(Vector512<double> v, int lane) => v.GetElement(lane);
    /// <inheritdoc/>
    public static Vector512<double> Set(Vector512<double> v, int lane, double x) => v.WithElement(lane, x);
    /// <inheritdoc/>
    public static void Store(Vector512<double> v, ref double destination) => v.StoreUnsafe(ref destination);
    /// <inheritdoc/>
    public static Vector512<ulong> Xor(Vector512<ulong> a, Vector512<ulong> b) => a ^ b;
    /// <inheritdoc/>
    public static Vector512<ulong> Or(Vector512<ulong> a, Vector512<ulong> b) => a | b;
    /// <inheritdoc/>
    public static Vector512<ulong> AndBits(Vector512<ulong> a, Vector512<ulong> b) => a & b;
    /// <inheritdoc/>
    public static Vector512<ulong> AddBits(Vector512<ulong> a, Vector512<ulong> b) => a + b;
    /// <inheritdoc/>
    public static Vector512<ulong> ShiftLeft(Vector512<ulong> a, int count) => Vector512.ShiftLeft(a, count);
    /// <inheritdoc/>
    public static Vector512<ulong> ShiftRight(Vector512<ulong> a, int count) => Vector512.ShiftRightLogical(a, count);
    /// <inheritdoc/>
    public static Vector512<ulong> BroadcastBits(ulong x) => Vector512.Create(x);
    /// <inheritdoc/>
    public static Vector512<ulong> Truncate(Vector512<double> a) => Vector512.ConvertToInt64(a).AsUInt64();
    /// <inheritdoc/>
    public static void StoreBits(Vector512<ulong> v, ref ulong destination) => v.StoreUnsafe(ref destination);
    /// <inheritdoc/>
    public static Vector512<double> BitsAsDouble(Vector512<ulong> a) => a.AsDouble();
    /// <inheritdoc/>
    public static Vector512<ulong> DoubleAsBits(Vector512<double> a) => a.AsUInt64();
    /// <inheritdoc/>
    public static ulong GetBits(Vector512<ulong> v, int lane) => v.GetElement(lane);
    /// <inheritdoc/>
    public static Vector512<ulong> SetBits(Vector512<ulong> v, int lane, ulong x) => v.WithElement(lane, x);
}

// Stryker disable all : vector-lane kernel, in no mutation mode (eng/mutation-testing.sh); LaneKernelTests checks it bit for bit
/// <summary>Four lanes in a 256-bit register.</summary>
public readonly struct Lanes4 : ILaneOps<Vector256<double>, Vector256<ulong>>
{
    /// <inheritdoc/>
    public static int Count => 4;
    /// <inheritdoc/>
    public static bool IsHardwareAccelerated => Vector256.IsHardwareAccelerated;
    /// <inheritdoc/>
    public static Vector256<double> Broadcast(double x) => Vector256.Create(x);
    /// <inheritdoc/>
    public static Vector256<double> Add(Vector256<double> a, Vector256<double> b) => a + b;
    /// <inheritdoc/>
    public static Vector256<double> Subtract(Vector256<double> a, Vector256<double> b) => a - b;
    /// <inheritdoc/>
    public static Vector256<double> Multiply(Vector256<double> a, Vector256<double> b) => a * b;
    /// <inheritdoc/>
    public static Vector256<double> Divide(Vector256<double> a, Vector256<double> b) => a / b;
    /// <inheritdoc/>
    public static Vector256<double> Sqrt(Vector256<double> a) => Vector256.Sqrt(a);
    /// <inheritdoc/>
    public static Vector256<double> Abs(Vector256<double> a) => Vector256.Abs(a);
    /// <inheritdoc/>
    public static Vector256<double> Or(Vector256<double> a, Vector256<double> b) => a | b;
    /// <inheritdoc/>
    public static Vector256<double> MultiplyAdd(Vector256<double> a, Vector256<double> b, Vector256<double> c) => Vector256.FusedMultiplyAdd(a, b, c);
    /// <inheritdoc/>
    public static Vector256<double> LessThan(Vector256<double> a, Vector256<double> b) => Vector256.LessThan(a, b);
    /// <inheritdoc/>
    public static Vector256<double> LessOrEqual(Vector256<double> a, Vector256<double> b) => Vector256.LessThanOrEqual(a, b);
    /// <inheritdoc/>
    public static Vector256<double> GreaterThan(Vector256<double> a, Vector256<double> b) => Vector256.GreaterThan(a, b);
    /// <inheritdoc/>
    public static Vector256<double> And(Vector256<double> a, Vector256<double> b) => a & b;
    /// <inheritdoc/>
    public static Vector256<double> Select(Vector256<double> mask, Vector256<double> ifTrue, Vector256<double> ifFalse) => Vector256.ConditionalSelect(mask, ifTrue, ifFalse);
    /// <inheritdoc/>
    public static bool AllTrue(Vector256<double> mask) => Vector256.ExtractMostSignificantBits(mask) == 0xFU;
    /// <inheritdoc/>
    public static double Get(Vector256<double> v, int lane) => v.GetElement(lane);
    /// <inheritdoc/>
    public static Vector256<double> Set(Vector256<double> v, int lane, double x) => v.WithElement(lane, x);
    /// <inheritdoc/>
    public static void Store(Vector256<double> v, ref double destination) => v.StoreUnsafe(ref destination);
    /// <inheritdoc/>
    public static Vector256<ulong> Xor(Vector256<ulong> a, Vector256<ulong> b) => a ^ b;
    /// <inheritdoc/>
    public static Vector256<ulong> Or(Vector256<ulong> a, Vector256<ulong> b) => a | b;
    /// <inheritdoc/>
    public static Vector256<ulong> AndBits(Vector256<ulong> a, Vector256<ulong> b) => a & b;
    /// <inheritdoc/>
    public static Vector256<ulong> AddBits(Vector256<ulong> a, Vector256<ulong> b) => a + b;
    /// <inheritdoc/>
    public static Vector256<ulong> ShiftLeft(Vector256<ulong> a, int count) => Vector256.ShiftLeft(a, count);
    /// <inheritdoc/>
    public static Vector256<ulong> ShiftRight(Vector256<ulong> a, int count) => Vector256.ShiftRightLogical(a, count);
    /// <inheritdoc/>
    public static Vector256<ulong> BroadcastBits(ulong x) => Vector256.Create(x);
    /// <inheritdoc/>
    public static Vector256<ulong> Truncate(Vector256<double> a) => Vector256.ConvertToInt64(a).AsUInt64();
    /// <inheritdoc/>
    public static void StoreBits(Vector256<ulong> v, ref ulong destination) => v.StoreUnsafe(ref destination);
    /// <inheritdoc/>
    public static Vector256<double> BitsAsDouble(Vector256<ulong> a) => a.AsDouble();
    /// <inheritdoc/>
    public static Vector256<ulong> DoubleAsBits(Vector256<double> a) => a.AsUInt64();
    /// <inheritdoc/>
    public static ulong GetBits(Vector256<ulong> v, int lane) => v.GetElement(lane);
    /// <inheritdoc/>
    public static Vector256<ulong> SetBits(Vector256<ulong> v, int lane, ulong x) => v.WithElement(lane, x);
}

// Stryker disable all : vector-lane kernel, in no mutation mode (eng/mutation-testing.sh); LaneKernelTests checks it bit for bit
/// <summary>Two lanes in a 128-bit register.</summary>
public readonly struct Lanes2 : ILaneOps<Vector128<double>, Vector128<ulong>>
{
    /// <inheritdoc/>
    public static int Count => 2;
    /// <inheritdoc/>
    public static bool IsHardwareAccelerated => Vector128.IsHardwareAccelerated;
    /// <inheritdoc/>
    public static Vector128<double> Broadcast(double x) => Vector128.Create(x);
    /// <inheritdoc/>
    public static Vector128<double> Add(Vector128<double> a, Vector128<double> b) => a + b;
    /// <inheritdoc/>
    public static Vector128<double> Subtract(Vector128<double> a, Vector128<double> b) => a - b;
    /// <inheritdoc/>
    public static Vector128<double> Multiply(Vector128<double> a, Vector128<double> b) => a * b;
    /// <inheritdoc/>
    public static Vector128<double> Divide(Vector128<double> a, Vector128<double> b) => a / b;
    /// <inheritdoc/>
    public static Vector128<double> Sqrt(Vector128<double> a) => Vector128.Sqrt(a);
    /// <inheritdoc/>
    public static Vector128<double> Abs(Vector128<double> a) => Vector128.Abs(a);
    /// <inheritdoc/>
    public static Vector128<double> Or(Vector128<double> a, Vector128<double> b) => a | b;
    /// <inheritdoc/>
    public static Vector128<double> MultiplyAdd(Vector128<double> a, Vector128<double> b, Vector128<double> c) => Vector128.FusedMultiplyAdd(a, b, c);
    /// <inheritdoc/>
    public static Vector128<double> LessThan(Vector128<double> a, Vector128<double> b) => Vector128.LessThan(a, b);
    /// <inheritdoc/>
    public static Vector128<double> LessOrEqual(Vector128<double> a, Vector128<double> b) => Vector128.LessThanOrEqual(a, b);
    /// <inheritdoc/>
    public static Vector128<double> GreaterThan(Vector128<double> a, Vector128<double> b) => Vector128.GreaterThan(a, b);
    /// <inheritdoc/>
    public static Vector128<double> And(Vector128<double> a, Vector128<double> b) => a & b;
    /// <inheritdoc/>
    public static Vector128<double> Select(Vector128<double> mask, Vector128<double> ifTrue, Vector128<double> ifFalse) => Vector128.ConditionalSelect(mask, ifTrue, ifFalse);
    /// <inheritdoc/>
    public static bool AllTrue(Vector128<double> mask) => Vector128.ExtractMostSignificantBits(mask) == 0x3U;
    /// <inheritdoc/>
    public static double Get(Vector128<double> v, int lane) => v.GetElement(lane);
    /// <inheritdoc/>
    public static Vector128<double> Set(Vector128<double> v, int lane, double x) => v.WithElement(lane, x);
    /// <inheritdoc/>
    public static void Store(Vector128<double> v, ref double destination) => v.StoreUnsafe(ref destination);
    /// <inheritdoc/>
    public static Vector128<ulong> Xor(Vector128<ulong> a, Vector128<ulong> b) => a ^ b;
    /// <inheritdoc/>
    public static Vector128<ulong> Or(Vector128<ulong> a, Vector128<ulong> b) => a | b;
    /// <inheritdoc/>
    public static Vector128<ulong> AndBits(Vector128<ulong> a, Vector128<ulong> b) => a & b;
    /// <inheritdoc/>
    public static Vector128<ulong> AddBits(Vector128<ulong> a, Vector128<ulong> b) => a + b;
    /// <inheritdoc/>
    public static Vector128<ulong> ShiftLeft(Vector128<ulong> a, int count) => Vector128.ShiftLeft(a, count);
    /// <inheritdoc/>
    public static Vector128<ulong> ShiftRight(Vector128<ulong> a, int count) => Vector128.ShiftRightLogical(a, count);
    /// <inheritdoc/>
    public static Vector128<ulong> BroadcastBits(ulong x) => Vector128.Create(x);
    /// <inheritdoc/>
    public static Vector128<ulong> Truncate(Vector128<double> a) => Vector128.ConvertToInt64(a).AsUInt64();
    /// <inheritdoc/>
    public static void StoreBits(Vector128<ulong> v, ref ulong destination) => v.StoreUnsafe(ref destination);
    /// <inheritdoc/>
    public static Vector128<double> BitsAsDouble(Vector128<ulong> a) => a.AsDouble();
    /// <inheritdoc/>
    public static Vector128<ulong> DoubleAsBits(Vector128<double> a) => a.AsUInt64();
    /// <inheritdoc/>
    public static ulong GetBits(Vector128<ulong> v, int lane) => v.GetElement(lane);
    /// <inheritdoc/>
    public static Vector128<ulong> SetBits(Vector128<ulong> v, int lane, ulong x) => v.WithElement(lane, x);
}

// Stryker disable all : vector-lane kernel, in no mutation mode (eng/mutation-testing.sh); LaneKernelTests checks it bit for bit
/// <summary>One lane in plain scalar registers: the fallback, and the reference the wider forms are tested against.</summary>
public readonly struct Lanes1 : ILaneOps<double, ulong>
{
    private static readonly double True = BitConverter.UInt64BitsToDouble(ulong.MaxValue);

    /// <inheritdoc/>
    public static int Count => 1;
    /// <inheritdoc/>
    public static bool IsHardwareAccelerated => true;
    /// <inheritdoc/>
    public static double Broadcast(double x) => x;
    /// <inheritdoc/>
    public static double Add(double a, double b) => a + b;
    /// <inheritdoc/>
    public static double Subtract(double a, double b) => a - b;
    /// <inheritdoc/>
    public static double Multiply(double a, double b) => a * b;
    /// <inheritdoc/>
    public static double Divide(double a, double b) => a / b;
    /// <inheritdoc/>
    public static double Sqrt(double a) => Math.Sqrt(a);
    /// <inheritdoc/>
    public static double Abs(double a) => Math.Abs(a);
    /// <inheritdoc/>
    public static double Or(double a, double b) => BitConverter.UInt64BitsToDouble(BitConverter.DoubleToUInt64Bits(a) | BitConverter.DoubleToUInt64Bits(b));
    /// <inheritdoc/>
    public static double MultiplyAdd(double a, double b, double c) => Math.FusedMultiplyAdd(a, b, c);
    // Comparisons and selects go through the low element of a 128-bit register, so the accept/reject decision is a blend,
    // not a branch the predictor gets wrong half the time (measured: 35 → 30 ns per pair step). The branchy forms are for
    // hardware without 128-bit vectors.
    /// <inheritdoc/>
    public static double LessThan(double a, double b) => Vector128.IsHardwareAccelerated
        ? Vector128.LessThan(Vector128.CreateScalarUnsafe(a), Vector128.CreateScalarUnsafe(b)).ToScalar()
        : a < b ? True : 0.0;
    /// <inheritdoc/>
    public static double LessOrEqual(double a, double b) => Vector128.IsHardwareAccelerated
        ? Vector128.LessThanOrEqual(Vector128.CreateScalarUnsafe(a), Vector128.CreateScalarUnsafe(b)).ToScalar()
        : a <= b ? True : 0.0;
    /// <inheritdoc/>
    public static double GreaterThan(double a, double b) => Vector128.IsHardwareAccelerated
        ? Vector128.GreaterThan(Vector128.CreateScalarUnsafe(a), Vector128.CreateScalarUnsafe(b)).ToScalar()
        : a > b ? True : 0.0;
    /// <inheritdoc/>
    public static double And(double a, double b) => Vector128.IsHardwareAccelerated
        ? (Vector128.CreateScalarUnsafe(a) & Vector128.CreateScalarUnsafe(b)).ToScalar()
        : BitConverter.UInt64BitsToDouble(BitConverter.DoubleToUInt64Bits(a) & BitConverter.DoubleToUInt64Bits(b));
    /// <inheritdoc/>
    public static double Select(double mask, double ifTrue, double ifFalse) => Vector128.IsHardwareAccelerated
        ? Vector128.ConditionalSelect(Vector128.CreateScalarUnsafe(mask), Vector128.CreateScalarUnsafe(ifTrue), Vector128.CreateScalarUnsafe(ifFalse)).ToScalar()
        : BitConverter.DoubleToUInt64Bits(mask) != 0 ? ifTrue : ifFalse;
    /// <inheritdoc/>
    public static bool AllTrue(double mask) => BitConverter.DoubleToUInt64Bits(mask) != 0;
    /// <inheritdoc/>
    public static double Get(double v, int lane) => v;
    /// <inheritdoc/>
    public static double Set(double v, int lane, double x) => x;
    /// <inheritdoc/>
    public static void Store(double v, ref double destination) => destination = v;
    /// <inheritdoc/>
    public static ulong Xor(ulong a, ulong b) => a ^ b;
    /// <inheritdoc/>
    public static ulong Or(ulong a, ulong b) => a | b;
    /// <inheritdoc/>
    public static ulong AndBits(ulong a, ulong b) => a & b;
    /// <inheritdoc/>
    public static ulong AddBits(ulong a, ulong b) => a + b;
    /// <inheritdoc/>
    public static ulong ShiftLeft(ulong a, int count) => a << count;
    /// <inheritdoc/>
    public static ulong ShiftRight(ulong a, int count) => a >> count;
    /// <inheritdoc/>
    public static ulong BroadcastBits(ulong x) => x;
    /// <inheritdoc/>
    public static ulong Truncate(double a) => (ulong)(long)a;
    /// <inheritdoc/>
    public static void StoreBits(ulong v, ref ulong destination) => destination = v;
    /// <inheritdoc/>
    public static double BitsAsDouble(ulong a) => BitConverter.UInt64BitsToDouble(a);
    /// <inheritdoc/>
    public static ulong DoubleAsBits(double a) => BitConverter.DoubleToUInt64Bits(a);
    /// <inheritdoc/>
    public static ulong GetBits(ulong v, int lane) => v;
    /// <inheritdoc/>
    public static ulong SetBits(ulong v, int lane, ulong x) => x;
}

// Stryker disable all : vector-lane kernel, in no mutation mode (eng/mutation-testing.sh); LaneKernelTests checks it bit for bit
/// <summary>
/// Lane-parallel functions built on <see cref="ILaneOps{TD, TB}"/>, identical bit for bit at every width.
/// </summary>
public static class LaneMath
{
    /// <summary>The argument below which <see cref="Exp{TOps, TD, TB}"/> returns 0.</summary>
    public const double ExpLowerLimit = -708.0;

    /// <summary>The argument above which <see cref="Exp{TOps, TD, TB}"/> saturates at e^709.</summary>
    public const double ExpUpperLimit = 709.0;

    private const double Log2E = 1.4426950408889634;
    private const double Ln2High = 6.93147180369123816490e-01; // ln 2 split in two (fdlibm's constants): n·Ln2High is exact
    private const double Ln2Low = 1.90821492927058770002e-10;
    private const double Shifter = 6755399441055744.0;          // 1.5·2^52: adding it rounds to an integer held in the low bits

    /// <summary>
    /// e^x for x in [−708, 709] with a relative error below 1e−15 (tested against Math.Exp); 0 below −708 and e^709
    /// above 709. Cody–Waite reduction x = n ln 2 + r, |r| ≤ ln 2 / 2, then the Taylor series of e^r to degree 13
    /// (truncation error below 5e−18) by Estrin's scheme with fused multiply-adds, scaled by 2^n built in the exponent bits.
    /// Written here because .NET's Vector512.Exp is not inlined (it spills the kernel's registers) and because the
    /// kernels need the same bits at every vector width, which Math.Exp cannot promise against a vector exp.
    /// </summary>
    /// <typeparam name="TOps">The lane width.</typeparam>
    /// <typeparam name="TD">Doubles, one per lane.</typeparam>
    /// <typeparam name="TB">Raw words, one per lane.</typeparam>
    /// <param name="x">The exponents.</param>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static TD Exp<TOps, TD, TB>(TD x)
        where TOps : struct, ILaneOps<TD, TB>
        where TD : struct
        where TB : struct
    {
        var upper = TOps.Broadcast(ExpUpperLimit);
        var below = TOps.LessThan(x, TOps.Broadcast(ExpLowerLimit));
        x = TOps.Select(TOps.GreaterThan(x, upper), upper, TOps.Select(below, TOps.Broadcast(ExpLowerLimit), x));
        var shifter = TOps.Broadcast(Shifter);
        var t = TOps.MultiplyAdd(x, TOps.Broadcast(Log2E), shifter);
        var n = TOps.Subtract(t, shifter);
        var r = TOps.MultiplyAdd(n, TOps.Broadcast(-Ln2High), x);
        r = TOps.MultiplyAdd(n, TOps.Broadcast(-Ln2Low), r);
        // Estrin's scheme (pairs, then powers r², r⁴, r⁸): four fused multiply-adds deep instead of Horner's thirteen,
        // because a Metropolis step waits on this result before the next can start.
        var r2 = TOps.Multiply(r, r);
        var r4 = TOps.Multiply(r2, r2);
        var r8 = TOps.Multiply(r4, r4);
        var p01 = TOps.MultiplyAdd(r, TOps.Broadcast(1.0), TOps.Broadcast(1.0));
        var p23 = TOps.MultiplyAdd(r, TOps.Broadcast(1.0 / 6.0), TOps.Broadcast(0.5));
        var p45 = TOps.MultiplyAdd(r, TOps.Broadcast(1.0 / 120.0), TOps.Broadcast(1.0 / 24.0));
        var p67 = TOps.MultiplyAdd(r, TOps.Broadcast(1.0 / 5040.0), TOps.Broadcast(1.0 / 720.0));
        var p89 = TOps.MultiplyAdd(r, TOps.Broadcast(1.0 / 362880.0), TOps.Broadcast(1.0 / 40320.0));
        var p1011 = TOps.MultiplyAdd(r, TOps.Broadcast(1.0 / 39916800.0), TOps.Broadcast(1.0 / 3628800.0));
        var p1213 = TOps.MultiplyAdd(r, TOps.Broadcast(1.0 / 6227020800.0), TOps.Broadcast(1.0 / 479001600.0));
        var q0 = TOps.MultiplyAdd(p23, r2, p01);
        var q1 = TOps.MultiplyAdd(p67, r2, p45);
        var q2 = TOps.MultiplyAdd(p1011, r2, p89);
        var s0 = TOps.MultiplyAdd(q1, r4, q0);
        var s1 = TOps.MultiplyAdd(p1213, r4, q2);
        var p = TOps.MultiplyAdd(s1, r8, s0);
        // The low bits of t hold n + 1.5·2^52; the exponent field of 2^n is n + 1023.
        var exponent = TOps.AddBits(TOps.DoubleAsBits(t), TOps.BroadcastBits(1023UL - BitConverter.DoubleToUInt64Bits(Shifter)));
        var scale = TOps.BitsAsDouble(TOps.ShiftLeft(exponent, 52));
        return TOps.Select(below, TOps.Broadcast(0.0), TOps.Multiply(p, scale));
    }

    /// <summary>
    /// sin x and cos x together in every lane, for |x| ≤ 10^6, with an absolute error below 1e−15 (tested against Math.Sin
    /// and Math.Cos). Reduction x = n·π/2 + r with |r| ≤ π/4 in three fused steps (π/2 split in 33-bit parts, fdlibm's
    /// constants, so n·part is exact for |n| &lt; 2^20), then the minimax polynomials of sin and cos on [−π/4, π/4] (fdlibm's
    /// kernel coefficients, recalled from memory and checked by the test), and the quadrant n mod 4 read from the low bits
    /// of the rounding sum to swap and sign them. Written here for the same reasons as <see cref="Exp{TOps, TD, TB}"/>:
    /// inlined into the recording loop and the same bits at every width.
    /// </summary>
    /// <typeparam name="TOps">The lane width.</typeparam>
    /// <typeparam name="TD">Doubles, one per lane.</typeparam>
    /// <typeparam name="TB">Raw words, one per lane.</typeparam>
    /// <param name="x">The angles, radians.</param>
    /// <param name="cos">cos x.</param>
    /// <returns>sin x.</returns>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static TD SinCos<TOps, TD, TB>(TD x, out TD cos)
        where TOps : struct, ILaneOps<TD, TB>
        where TD : struct
        where TB : struct
    {
        var shifter = TOps.Broadcast(Shifter);
        var t = TOps.MultiplyAdd(x, TOps.Broadcast(TwoOverPi), shifter);
        var n = TOps.Subtract(t, shifter);
        var r = TOps.MultiplyAdd(n, TOps.Broadcast(-HalfPi1), x);
        r = TOps.MultiplyAdd(n, TOps.Broadcast(-HalfPi2), r);
        r = TOps.MultiplyAdd(n, TOps.Broadcast(-HalfPi2Tail), r);
        var z = TOps.Multiply(r, r);
        var z2 = TOps.Multiply(z, z);
        // sin r = r + r³(S1 + z S2 + … + z⁵ S6), cos r = 1 − z/2 + z²(C1 + z C2 + … + z⁵ C6), each polynomial in z by pairs.
        var s = TOps.MultiplyAdd(TOps.MultiplyAdd(TOps.MultiplyAdd(TOps.Broadcast(SinC6), z, TOps.Broadcast(SinC5)), z2,
                TOps.MultiplyAdd(TOps.Broadcast(SinC4), z, TOps.Broadcast(SinC3))), z2, TOps.MultiplyAdd(TOps.Broadcast(SinC2), z, TOps.Broadcast(SinC1)));
        var sinR = TOps.MultiplyAdd(TOps.Multiply(z, r), s, r);
        var c = TOps.MultiplyAdd(TOps.MultiplyAdd(TOps.MultiplyAdd(TOps.Broadcast(CosC6), z, TOps.Broadcast(CosC5)), z2,
                TOps.MultiplyAdd(TOps.Broadcast(CosC4), z, TOps.Broadcast(CosC3))), z2, TOps.MultiplyAdd(TOps.Broadcast(CosC2), z, TOps.Broadcast(CosC1)));
        var cosR = TOps.MultiplyAdd(z2, c, TOps.MultiplyAdd(z, TOps.Broadcast(-0.5), TOps.Broadcast(1.0)));
        // The low bits of t hold n + 1.5·2^52, and 1.5·2^52 is a multiple of 4, so its two lowest bits are n mod 4:
        // bit 0 swaps sin and cos, bit 1 negates sin, and bit 0 xor bit 1 negates cos.
        var bits = TOps.DoubleAsBits(t);
        var one = TOps.BroadcastBits(1);
        var odd = TOps.LessThan(TOps.BitsAsDouble(TOps.Or(TOps.ShiftLeft(TOps.AndBits(bits, one), 63), TOps.DoubleAsBits(TOps.Broadcast(1.0)))), TOps.Broadcast(0.0));
        var sinSign = TOps.ShiftLeft(TOps.AndBits(TOps.ShiftRight(bits, 1), one), 63);
        var cosSign = TOps.ShiftLeft(TOps.AndBits(TOps.Xor(bits, TOps.ShiftRight(bits, 1)), one), 63);
        cos = TOps.BitsAsDouble(TOps.Xor(TOps.DoubleAsBits(TOps.Select(odd, sinR, cosR)), cosSign));
        return TOps.BitsAsDouble(TOps.Xor(TOps.DoubleAsBits(TOps.Select(odd, cosR, sinR)), sinSign));
    }

    /// <summary>
    /// ln x in every lane for normal positive x (0 &lt; x ≤ 1.8e308, x ≥ 2.2e−308), with a relative error below 1e−15 away from
    /// x = 1 and an absolute error below 1e−16 near it (tested against Math.Log). x = 2^k·m with m in [√½, √2), then
    /// ln m = 2 atanh s = 2(s + s³/3 + s⁵/5 + …) with s = (m − 1)/(m + 1), |s| ≤ 0.172, to s²³ (truncation below 1e−19),
    /// and k·ln 2 added in two parts. Written here for the path-integral walk's Gaussian draws (Box–Muller), for the same
    /// reasons as <see cref="Exp{TOps, TD, TB}"/>: inlined into the loop and the same bits at every width.
    /// </summary>
    /// <typeparam name="TOps">The lane width.</typeparam>
    /// <typeparam name="TD">Doubles, one per lane.</typeparam>
    /// <typeparam name="TB">Raw words, one per lane.</typeparam>
    /// <param name="x">The arguments (normal, positive).</param>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static TD Log<TOps, TD, TB>(TD x)
        where TOps : struct, ILaneOps<TD, TB>
        where TD : struct
        where TB : struct
    {
        var bits = TOps.DoubleAsBits(x);
        var exponentField = TOps.ShiftRight(bits, 52);                                  // k + 1023 (x positive: no sign bit)
        var m = TOps.BitsAsDouble(TOps.Or(TOps.AndBits(bits, TOps.BroadcastBits(0x000FFFFFFFFFFFFFUL)), TOps.BroadcastBits(0x3FF0000000000000UL)));
        var twoTo52 = TOps.Broadcast(4503599627370496.0);
        var k = TOps.Subtract(TOps.Subtract(TOps.BitsAsDouble(TOps.Or(exponentField, TOps.BroadcastBits(0x4330000000000000UL))), twoTo52), TOps.Broadcast(1023.0));
        var high = TOps.GreaterThan(m, TOps.Broadcast(1.4142135623730951));
        m = TOps.Select(high, TOps.Multiply(m, TOps.Broadcast(0.5)), m);             // exact: a power of two
        k = TOps.Select(high, TOps.Add(k, TOps.Broadcast(1.0)), k);
        var s = TOps.Divide(TOps.Subtract(m, TOps.Broadcast(1.0)), TOps.Add(m, TOps.Broadcast(1.0)));
        var z = TOps.Multiply(s, s);
        var z2 = TOps.Multiply(z, z);
        var z4 = TOps.Multiply(z2, z2);
        var z8 = TOps.Multiply(z4, z4);
        // 2/(2n + 1) for n = 0 … 11, by Estrin's scheme in z.
        var p01 = TOps.MultiplyAdd(z, TOps.Broadcast(2.0 / 3.0), TOps.Broadcast(2.0));
        var p23 = TOps.MultiplyAdd(z, TOps.Broadcast(2.0 / 7.0), TOps.Broadcast(2.0 / 5.0));
        var p45 = TOps.MultiplyAdd(z, TOps.Broadcast(2.0 / 11.0), TOps.Broadcast(2.0 / 9.0));
        var p67 = TOps.MultiplyAdd(z, TOps.Broadcast(2.0 / 15.0), TOps.Broadcast(2.0 / 13.0));
        var p89 = TOps.MultiplyAdd(z, TOps.Broadcast(2.0 / 19.0), TOps.Broadcast(2.0 / 17.0));
        var p1011 = TOps.MultiplyAdd(z, TOps.Broadcast(2.0 / 23.0), TOps.Broadcast(2.0 / 21.0));
        var q0 = TOps.MultiplyAdd(p23, z2, p01);
        var q1 = TOps.MultiplyAdd(p67, z2, p45);
        var q2 = TOps.MultiplyAdd(p1011, z2, p89);
        var series = TOps.MultiplyAdd(q2, z8, TOps.MultiplyAdd(q1, z4, q0));
        var lnM = TOps.Multiply(s, series);
        return TOps.MultiplyAdd(k, TOps.Broadcast(Ln2High), TOps.MultiplyAdd(k, TOps.Broadcast(Ln2Low), lnM));
    }

    /// <summary>
    /// Two independent standard normal deviates in every lane from two uniforms (Box &amp; Muller, Ann. Math. Stat. 29, 610
    /// (1958)): √(−2 ln(1 − u₁))·(cos 2πu₂, sin 2πu₂), with u₁ from the top 52 bits (so 1 − u₁ ≥ 2^−52 and the logarithm is
    /// finite). The same bits at every width.
    /// </summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    internal static TD NextGaussianPair<TOps, TD, TB>(ref TB s0, ref TB s1, ref TB s2, ref TB s3, out TD second)
        where TOps : struct, ILaneOps<TD, TB>
        where TD : struct
        where TB : struct
    {
        var u1 = NextUnit<TOps, TD, TB>(ref s0, ref s1, ref s2, ref s3);
        var u2 = NextUnit<TOps, TD, TB>(ref s0, ref s1, ref s2, ref s3);
        var radius = TOps.Sqrt(TOps.Multiply(TOps.Broadcast(-2.0), Log<TOps, TD, TB>(TOps.Subtract(TOps.Broadcast(1.0), u1))));
        var sin = SinCos<TOps, TD, TB>(TOps.Multiply(u2, TOps.Broadcast(2 * Math.PI)), out var cos);
        second = TOps.Multiply(radius, sin);
        return TOps.Multiply(radius, cos);
    }

    private const double TwoOverPi = 6.36619772367581382433e-01;
    private const double HalfPi1 = 1.57079632673412561417e+00;     // π/2 = HalfPi1 + HalfPi2 + HalfPi2Tail (fdlibm's pio2_1, pio2_2, pio2_2t)
    private const double HalfPi2 = 6.07710050630396597660e-11;
    private const double HalfPi2Tail = 2.02226624879595063154e-21;
    private const double SinC1 = -1.66666666666666324348e-01, SinC2 = 8.33333333332248946124e-03, SinC3 = -1.98412698298579493134e-04;
    private const double SinC4 = 2.75573137070700676789e-06, SinC5 = -2.50507602534068634195e-08, SinC6 = 1.58969099521155010221e-10;
    private const double CosC1 = 4.16666666666666019037e-02, CosC2 = -1.38888888888741095749e-03, CosC3 = 2.48015872894767294178e-05;
    private const double CosC4 = -2.75573143513906633035e-07, CosC5 = 2.08757232129817482790e-09, CosC6 = -1.13596475577881948265e-11;

    /// <summary>One xoshiro256** step in every lane (Blackman &amp; Vigna, ACM TOMS 47(4), 2021): the same outputs as <see cref="Randomness.RandomStream.NextUInt64"/>.</summary>
    /// <remarks>The state comes as four separate locals, not a struct, so that the JIT keeps them in registers.</remarks>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    internal static TB NextBits<TOps, TD, TB>(ref TB s0, ref TB s1, ref TB s2, ref TB s3)
        where TOps : struct, ILaneOps<TD, TB>
        where TD : struct
        where TB : struct
    {
        // result = rotl(s1·5, 7)·9, with the multiplications as shifts and adds (64-bit vector multiply is slow or missing).
        var times5 = TOps.AddBits(TOps.ShiftLeft(s1, 2), s1);
        var rotated = TOps.Or(TOps.ShiftLeft(times5, 7), TOps.ShiftRight(times5, 57));
        var result = TOps.AddBits(TOps.ShiftLeft(rotated, 3), rotated);
        var t = TOps.ShiftLeft(s1, 17);
        s2 = TOps.Xor(s2, s0);
        s3 = TOps.Xor(s3, s1);
        s1 = TOps.Xor(s1, s2);
        s0 = TOps.Xor(s0, s3);
        s2 = TOps.Xor(s2, t);
        s3 = TOps.Or(TOps.ShiftLeft(s3, 45), TOps.ShiftRight(s3, 19));
        return result;
    }

    /// <summary>
    /// Two symmetric uniform offsets in (−1, 1) in every lane from one 64-bit output: each half k (32 bits) gives
    /// (2k + 1)/2^32 − 1, a grid symmetric about 0, so a proposal built from it is exactly symmetric. For proposals only:
    /// 32 bits of resolution are ample for a step, while acceptance tests use <see cref="NextUnit{TOps, TD, TB}"/>.
    /// </summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    internal static TD NextOffsetPair<TOps, TD, TB>(ref TB s0, ref TB s1, ref TB s2, ref TB s3, out TD second)
        where TOps : struct, ILaneOps<TD, TB>
        where TD : struct
        where TB : struct
    {
        var bits = NextBits<TOps, TD, TB>(ref s0, ref s1, ref s2, ref s3);
        var exponent = TOps.BroadcastBits(0x4330000000000000UL); // 2^52: or-ing in k < 2^32 gives the double 2^52 + k exactly
        var twoTo52 = TOps.Broadcast(4503599627370496.0);
        var scale = TOps.Broadcast(1.0 / 2147483648.0);            // 2^−31
        var offset = TOps.Broadcast(1.0 - 1.0 / 4294967296.0);     // 1 − 2^−32
        var high = TOps.Subtract(TOps.BitsAsDouble(TOps.Or(TOps.ShiftRight(bits, 32), exponent)), twoTo52);
        var low = TOps.Subtract(TOps.BitsAsDouble(TOps.Or(TOps.AndBits(bits, TOps.BroadcastBits(0xFFFFFFFFUL)), exponent)), twoTo52);
        second = TOps.Subtract(TOps.Multiply(low, scale), offset);
        return TOps.Subtract(TOps.Multiply(high, scale), offset);
    }

    /// <summary>A uniform double in [0, 1) in every lane from the top 52 bits of the next output (exponent-field construction, exact at every width).</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    internal static TD NextUnit<TOps, TD, TB>(ref TB s0, ref TB s1, ref TB s2, ref TB s3)
        where TOps : struct, ILaneOps<TD, TB>
        where TD : struct
        where TB : struct
    {
        var bits = TOps.Or(TOps.ShiftRight(NextBits<TOps, TD, TB>(ref s0, ref s1, ref s2, ref s3), 12), TOps.BroadcastBits(0x3FF0000000000000UL));
        return TOps.Subtract(TOps.BitsAsDouble(bits), TOps.Broadcast(1.0));
    }
}

/// <summary>Work to be done at one lane width, chosen at run time (<see cref="LaneWidths.Dispatch{TJob, TResult}"/>).</summary>
/// <typeparam name="TResult">What the work returns.</typeparam>
internal interface ILaneWidthJob<TResult>
{
    /// <summary>Does the work at the width <typeparamref name="TOps"/>.</summary>
    TResult Run<TOps, TD, TB>()
        where TOps : struct, ILaneOps<TD, TB>
        where TD : struct
        where TB : struct;
}

/// <summary>The one place a lane count becomes a lane type.</summary>
internal static class LaneWidths
{
    /// <summary>Runs <paramref name="job"/> at 8, 4 or 2 lanes per register, or 1 for any other count.</summary>
    internal static TResult Dispatch<TJob, TResult>(int lanes, TJob job)
        where TJob : struct, ILaneWidthJob<TResult>
        => lanes switch
        {
            8 => job.Run<Lanes8, Vector512<double>, Vector512<ulong>>(),
            4 => job.Run<Lanes4, Vector256<double>, Vector256<ulong>>(),
            2 => job.Run<Lanes2, Vector128<double>, Vector128<ulong>>(),
            _ => job.Run<Lanes1, double, ulong>(),
        };
}
