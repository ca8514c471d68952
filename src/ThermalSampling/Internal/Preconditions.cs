using System;
using System.Globalization;

namespace ThermalSampling.Internal;

/// <summary>
/// The one place where argument checks live. Every message names the parameter, the value
/// (formatted in the invariant culture) and the valid range, so a user can fix the call without
/// reading the source.
/// </summary>
internal static class Preconditions
{
    internal static string Format(double value) => value.ToString("R", CultureInfo.InvariantCulture);

    /// <summary>Throws unless <paramref name="value"/> is a finite number.</summary>
    internal static double CheckFinite(double value, string paramName)
    {
        if (!double.IsFinite(value))
        {
            throw new ArgumentOutOfRangeException(paramName, value,
                $"{paramName} = {Format(value)} is not a finite number; it must be finite.");
        }
        return value;
    }

    /// <summary>Throws unless <paramref name="value"/> is finite and strictly positive.</summary>
    internal static double CheckPositive(double value, string paramName)
    {
        if (!double.IsFinite(value) || value <= 0)
        {
            throw new ArgumentOutOfRangeException(paramName, value,
                $"{paramName} = {Format(value)} is out of range; it must be finite and greater than 0.");
        }
        return value;
    }

    /// <summary>Throws unless <paramref name="value"/> is finite and not negative.</summary>
    internal static double CheckNonNegative(double value, string paramName)
    {
        if (!double.IsFinite(value) || value < 0)
        {
            throw new ArgumentOutOfRangeException(paramName, value,
                $"{paramName} = {Format(value)} is out of range; it must be finite and at least 0.");
        }
        return value;
    }

    /// <summary>Throws unless <paramref name="value"/> lies in the closed interval [min, max].</summary>
    internal static double CheckRange(double value, double min, double max, string paramName)
    {
        if (!double.IsFinite(value) || value < min || value > max)
        {
            throw new ArgumentOutOfRangeException(paramName, value,
                $"{paramName} = {Format(value)} is out of range; valid range is [{Format(min)}, {Format(max)}].");
        }
        return value;
    }

    /// <summary>Throws unless <paramref name="value"/> lies in the closed interval [min, max].</summary>
    internal static int CheckRange(int value, int min, int max, string paramName)
    {
        if (value < min || value > max)
        {
            throw new ArgumentOutOfRangeException(paramName, value,
                $"{paramName} = {value.ToString(CultureInfo.InvariantCulture)} is out of range; valid range is [{min.ToString(CultureInfo.InvariantCulture)}, {max.ToString(CultureInfo.InvariantCulture)}].");
        }
        return value;
    }

    /// <summary>Throws unless lower &lt; upper, both finite.</summary>
    internal static void CheckOrdered(double lower, double upper, string paramName)
    {
        CheckFinite(lower, paramName);
        CheckFinite(upper, paramName);
        if (!(lower < upper))
        {
            throw new ArgumentException(
                $"{paramName} = [{Format(lower)}, {Format(upper)}] is empty or reversed; the lower bound must be smaller than the upper bound.",
                paramName);
        }
    }

    /// <summary>Throws unless the reference is not null.</summary>
    internal static T CheckNotNull<T>(T? value, string paramName) where T : class
        => value ?? throw new ArgumentNullException(paramName, $"{paramName} must not be null.");
}
