namespace PulseLadder.Core.Pipeline;

/// <summary>
/// Version of the analysis. A star with no result for the current version is pending and is (re)analysed.
/// Bump it whenever a change alters numbers a stored result would hold.
/// 0.1.1: vectorised harmonic least squares and spectral window (sums in another order: results move by rounding).
/// 0.2.0: calibration registry in the input hash; field PL class pass recorded with the result.
/// 0.2.1: both of the above together.
/// 0.3.0: default grid oversampling 5 (was 10; peaks are refined locally as before); plotted periodogram and
///        window stored rounded (1e-7 c/d, 1e-5 in power).
/// 0.4.0: long search grids and their spectral window by the NUFFT at 1e-9 sum error (power within a few 1e-10 of the
///        exact kernel; peaks still refined with it); faster refinement fit; TT->BJD_TDB interpolated per star
///        (within one JD ulp); input hash over a recorded digest of the observations.
/// 0.5.0: candidates ranked by the harmonic model at their grid frequency, only listed peaks refined on the GLS (one
///        zoom level); the refinement fit starts from the search's model minimum.
/// </summary>
public static class PipelineVersion
{
    public const string Current = "0.5.0";
}
