using RateDeck.Outputs;
using Xunit;

namespace RateDeck.Tests.Outputs;

/// <summary>Issue 8 section 4: never a silent text-less plot.</summary>
public sealed class PlotFontTests
{
    [Fact]
    public void WithoutAnyFont_PlotsAreRefusedInOneLineNamingTheDebianFontPackage()
    {
        var problem = Plots.FontProblem(null);

        // fonts-dejavu-core is the Debian package of DejaVu Sans (packages.debian.org, common practice).
        Assert.NotNull(problem);
        Assert.Contains("apt-get install fonts-dejavu-core", problem, StringComparison.Ordinal);
        Assert.Contains("--no-plots", problem, StringComparison.Ordinal);
        Assert.DoesNotContain('\n', problem);
    }

    [Fact]
    public void WithAFontFamily_PlotsAreDrawn()
    {
        Assert.Null(Plots.FontProblem("DejaVu Sans"));
    }
}
