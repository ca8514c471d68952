using System.Collections.Immutable;
using System.Threading.Tasks;
using Microsoft.DotNet.Interactive;
using Microsoft.DotNet.Interactive.Formatting;
using ThermalSampling.Reports;

namespace ThermalSampling.Plotting.Interactive;

/// <summary>
/// Loaded by the notebook host when a notebook references the ThermalSampling.Plotting package (the package carries this
/// assembly in interactive-extensions/dotnet, the host's convention for packages that register their own formatters): a
/// report, or the reports of a sweep, shown as a cell's value or with display(...) renders as its HTML table, warnings
/// and figure.
/// </summary>
public sealed class ReportFormatters : IKernelExtension
{
    /// <summary>Registers the HTML formatters of the report types.</summary>
    /// <param name="kernel">The kernel loading the extension.</param>
    public Task OnLoadAsync(Kernel kernel)
    {
        Formatter.Register<PairVibrationReport>((r, w) => w.Write(r.ToHtmlWithFigure()), HtmlFormatter.MimeType);
        Formatter.Register<SiteVibrationReport>((r, w) => w.Write(r.ToHtmlWithFigure()), HtmlFormatter.MimeType);
        Formatter.Register<ImmutableArray<PairVibrationReport>>((r, w) => w.Write(r.ToHtmlWithFigure()), HtmlFormatter.MimeType);
        Formatter.Register<ImmutableArray<SiteVibrationReport>>((r, w) => w.Write(r.ToHtmlWithFigure()), HtmlFormatter.MimeType);
        return Task.CompletedTask;
    }
}
