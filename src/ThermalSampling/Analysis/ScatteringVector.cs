using System;
using ThermalSampling.Landscapes;

namespace ThermalSampling.Analysis;

/// <summary>
/// Scattering vectors as diffraction gives them: |Q| = 4π sin θ/λ (so Q = 2πh with |h| = 2 sin θ/λ, the reciprocal-lattice
/// vector of a reflection). The temperature factor of a displacement u at Q is ⟨exp(iQ·u)⟩.
/// </summary>
public static class ScatteringVector
{
    /// <summary>The scattering vector of length 4π·<paramref name="sinThetaOverLambdaInInverseAngstroms"/> along <paramref name="direction"/>, Å⁻¹.</summary>
    /// <param name="sinThetaOverLambdaInInverseAngstroms">sin θ/λ, Å⁻¹, 0 to 100.</param>
    /// <param name="direction">Any non-zero vector along Q (only its direction is used).</param>
    /// <exception cref="ArgumentOutOfRangeException">sin θ/λ outside [0, 100], or a zero or non-finite direction.</exception>
    public static Position FromSinThetaOverLambda(double sinThetaOverLambdaInInverseAngstroms, Position direction)
    {
        if (!(sinThetaOverLambdaInInverseAngstroms >= 0 && sinThetaOverLambdaInInverseAngstroms <= 100))
        {
            throw new ArgumentOutOfRangeException(nameof(sinThetaOverLambdaInInverseAngstroms), sinThetaOverLambdaInInverseAngstroms,
                "sin θ/λ must be between 0 and 100 Å⁻¹.");
        }
        double norm = direction.Norm;
        if (!(norm > 0) || !double.IsFinite(norm))
        {
            throw new ArgumentOutOfRangeException(nameof(direction), direction, "The direction must be a finite, non-zero vector.");
        }
        return (4 * Math.PI * sinThetaOverLambdaInInverseAngstroms / norm) * direction;
    }

    /// <summary>|Q| = 4π sin θ/λ, Å⁻¹ (for a pair's separation, or a length along one axis).</summary>
    /// <param name="sinThetaOverLambdaInInverseAngstroms">sin θ/λ, Å⁻¹, 0 to 100.</param>
    public static double MagnitudeFromSinThetaOverLambda(double sinThetaOverLambdaInInverseAngstroms)
        => FromSinThetaOverLambda(sinThetaOverLambdaInInverseAngstroms, new Position(1, 0, 0)).X;
}
