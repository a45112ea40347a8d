using RateDeck.Outputs;
using Xunit;

namespace RateDeck.Tests.Outputs;

public sealed class TerminalProgressTests
{
    private sealed class ManualClock : TimeProvider
    {
        private long _ticks;

        public override long TimestampFrequency => TimeSpan.TicksPerSecond;

        public override long GetTimestamp() => _ticks;

        public void Advance(TimeSpan span) => _ticks += span.Ticks;
    }

    [Fact]
    public void Redraws_AtMostTenTimesASecond_ButAlwaysDrawsCompletion()
    {
        var clock = new ManualClock();
        var output = new StringWriter();
        var bar = new TerminalProgress("run", output, clock);

        for (var k = 1; k <= 100; k++)
        {
            clock.Advance(TimeSpan.FromMilliseconds(10));
            bar.Report(k / 100.0);
        }
        bar.Finish();

        var frames = output.ToString().Split('\r', StringSplitOptions.RemoveEmptyEntries);
        // One second of reports every 10 ms: the first draw, one every 100 ms after it, the final one.
        Assert.InRange(frames.Length, 10, 12);
        Assert.Contains("100.0%", frames[^1], StringComparison.Ordinal);
        Assert.Contains("done in 0:01", frames[^1], StringComparison.Ordinal);
        Assert.EndsWith("\n", output.ToString(), StringComparison.Ordinal);
    }

    [Fact]
    public void RemainingTime_IsExtrapolatedFromTheElapsedTime()
    {
        var clock = new ManualClock();
        var output = new StringWriter();
        var bar = new TerminalProgress("fit", output, clock);

        clock.Advance(TimeSpan.FromSeconds(30));
        bar.Report(0.25);

        Assert.Contains(" 25.0%  1:30 left", output.ToString(), StringComparison.Ordinal);
    }

    [Fact]
    public void ShorterLine_OverwritesTheLongerOneCompletely()
    {
        var clock = new ManualClock();
        var output = new StringWriter();
        var bar = new TerminalProgress("x", output, clock);

        clock.Advance(TimeSpan.FromSeconds(1));
        bar.Report(0.005);
        clock.Advance(TimeSpan.FromSeconds(1));
        bar.Report(0.5);

        var frames = output.ToString().Split('\r', StringSplitOptions.RemoveEmptyEntries);
        Assert.True(frames[1].Length >= frames[0].Length);
    }

    [Fact]
    public void Disabled_WritesNothing_AndFinishIsSafe()
    {
        var output = new StringWriter();
        using var bar = new TerminalProgress("run", null, new ManualClock());

        bar.Report(0.5);
        bar.Finish();

        Assert.False(bar.IsActive);
        Assert.False(new TerminalProgress("run", enabled: false).IsActive);
    }

    [Fact]
    public void ReportsAfterFinish_AreIgnored_AndNothingDrawnMeansNoNewline()
    {
        var output = new StringWriter();
        var bar = new TerminalProgress("run", output, new ManualClock());

        bar.Finish();
        bar.Report(0.5);

        Assert.Equal("", output.ToString());
    }
}
