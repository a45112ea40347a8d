using System.Diagnostics;
using System.Reflection.PortableExecutable;
using System.Text.Json;
using System.Text.RegularExpressions;
using RateDeck.Cli;
using Xunit;

namespace RateDeck.Tests.Cli;

/// <summary>
/// The `ratedeck` script at the repository root, as README.md tells a user to run it: executable
/// as it is checked out, it publishes the program once (native code where clang is installed,
/// ReadyToRun otherwise), runs it with the arguments given and keeps stdout to the program (issue 9
/// §1 and §6). The first test here publishes the program when the checkout has no up-to-date copy
/// yet (a clean clone in CI), which takes a minute or two.
/// </summary>
public sealed class WrapperScriptTests
{
    [Fact]
    public async Task Script_RunsTheProgramWithItsArgumentsAndExitCode()
    {
        var root = CliRunner.RepositoryRoot();
        var build = await RunScriptAsync(root, null, "--version");
        Assert.True(build.Code == ExitCodes.Success, build.Error);

        var ok = await RunScriptAsync(root, null, "check", Path.Combine(root, "decks", "two-level.toml"), "--json");
        var bad = await RunScriptAsync(root, null, "check", Path.Combine(root, "decks", "two-level.toml"), "--jsn");

        Assert.True(ok.Code == ExitCodes.Success, ok.Error);
        Assert.True(JsonDocument.Parse(ok.Out).RootElement.GetProperty("ok").GetBoolean());
        Assert.Equal("", ok.Error);
        Assert.Equal(ExitCodes.BadInput, bad.Code);
        Assert.Contains("`--json`", bad.Error, StringComparison.Ordinal);
    }

    /// <summary>
    /// Where clang is installed the script runs a native executable: an ELF file (magic 0x7F 'E' 'L'
    /// 'F', System V ABI) with no assembly for a runtime to load beside it. Otherwise the program is
    /// ReadyToRun: the CLI header's ManagedNativeHeader points at a READYTORUN_HEADER whose signature
    /// is 0x00525452 ("RTR"), as the ReadyToRun format description in the .NET runtime's design
    /// documents (readytorun-format.md) defines it; an IL-only assembly from `dotnet build` has none.
    /// </summary>
    [Fact]
    public async Task Script_RunsANativeBuildWhereClangIsInstalled_ReadyToRunOtherwise()
    {
        var root = CliRunner.RepositoryRoot();
        var build = await RunScriptAsync(root, null, "--version");
        Assert.True(build.Code == ExitCodes.Success, build.Error);

        var published = Path.Combine(root, "solver", "RateDeck.Cli", "bin", "published");
        if (ClangInstalled())
        {
            Assert.Equal("\u007fELF"u8.ToArray(), File.ReadAllBytes(Path.Combine(published, "ratedeck"))[..4]);
            Assert.False(File.Exists(Path.Combine(published, "ratedeck.dll")));
            return;
        }

        foreach (var assembly in new[] { "ratedeck.dll", "RateDeck.Engine.dll", "Tomlyn.dll", "System.CommandLine.dll" })
        {
            Assert.True(ReadyToRunSignature(Path.Combine(published, assembly)) == 0x00525452, $"{assembly} is not ReadyToRun");
        }

        var plain = Path.Combine(AppContext.BaseDirectory, "RateDeck.Engine.dll");
        Assert.Null(ReadyToRunSignature(plain));
    }

    [Theory]
    [InlineData("native")]
    [InlineData("readytorun")]
    public async Task EachBuild_IsPublishedWithItsOptions_AndRunAsItMustBe(string build)
    {
        using var checkout = new ScratchCheckout();

        var run = await RunScriptAsync(checkout.Root, checkout.Environment(("RATEDECK_BUILD", build)), "check", "deck.toml");

        Assert.Equal(0, run.Code);
        var native = Path.Combine(checkout.Published, "ratedeck");
        var managed = Path.Combine(checkout.Published, "ratedeck.dll");
        Assert.Equal(build == "native" ? $"native {native} check deck.toml\n" : $"program {managed} check deck.toml\n", run.Out);
        var publish = File.ReadAllText(checkout.BuildLog);
        Assert.Equal(build == "native", publish.Contains("-p:RateDeckNative=true -p:CppCompilerAndLinker=clang", StringComparison.Ordinal));
        Assert.Equal(build == "readytorun", publish.Contains("--self-contained false", StringComparison.Ordinal));
    }

    [Fact]
    public async Task NativeBuildFailing_FallsBackToReadyToRun_SayingWhy()
    {
        using var checkout = new ScratchCheckout();

        var run = await RunScriptAsync(checkout.Root, checkout.Environment(("FAKE_NATIVE_ERROR", "ILC: the linker failed")), "check", "deck.toml");

        Assert.Equal(0, run.Code);
        Assert.Equal($"program {Path.Combine(checkout.Published, "ratedeck.dll")} check deck.toml\n", run.Out);
        var lines = run.Error.Split('\n', StringSplitOptions.RemoveEmptyEntries);
        Assert.Equal(4, lines.Length);
        Assert.StartsWith("ratedeck: the native build failed (its messages are in ", lines[1], StringComparison.Ordinal);
        Assert.EndsWith("; building ReadyToRun instead (RATEDECK_BUILD=readytorun skips the native attempt)", lines[1], StringComparison.Ordinal);
        Assert.Equal("ratedeck: built; running", lines[3]);
        Assert.Equal(2, checkout.Builds());
    }

    [Fact]
    public async Task NativeBuildAskedForAndFailing_ShowsItsMessages_AndRunsNothing()
    {
        using var checkout = new ScratchCheckout();

        var run = await RunScriptAsync(checkout.Root, checkout.Environment(("RATEDECK_BUILD", "native"), ("FAKE_NATIVE_ERROR", "ILC: the linker failed")), "check", "deck.toml");

        Assert.Equal((1, ""), (run.Code, run.Out));
        Assert.Contains("ILC: the linker failed", run.Error, StringComparison.Ordinal);
        Assert.Contains("ratedeck: the build failed", run.Error, StringComparison.Ordinal);
        Assert.Equal(1, checkout.Builds());
    }

    [Fact]
    public async Task CompletionOnAStaleCheckout_OffersNothingAndDoesNotBuild()
    {
        using var checkout = new ScratchCheckout();

        var run = await RunScriptAsync(checkout.Root, checkout.Environment(), "[complete]", "ch");

        Assert.Equal((0, "", ""), (run.Code, run.Out, run.Error));
        Assert.Equal(0, checkout.Builds());
    }

    [Fact]
    public async Task UnknownBuildKind_IsRefusedBeforeBuilding()
    {
        using var checkout = new ScratchCheckout();

        var run = await RunScriptAsync(checkout.Root, checkout.Environment(("RATEDECK_BUILD", "jit")), "--version");

        Assert.Equal(1, run.Code);
        Assert.Equal("ratedeck: RATEDECK_BUILD is native or readytorun, not 'jit'\n", run.Error);
        Assert.Equal(0, checkout.Builds());
    }

    /// <summary>True when the script's search for a linker finds a clang on PATH.</summary>
    private static bool ClangInstalled() =>
        (Environment.GetEnvironmentVariable("PATH") ?? "").Split(':', StringSplitOptions.RemoveEmptyEntries)
            .Any(folder => Directory.Exists(folder) && Directory.EnumerateFiles(folder, "clang*").Any(f => Regex.IsMatch(Path.GetFileName(f), "^clang(-[0-9]+)?$")));

    [Fact]
    public async Task FirstRun_BuildsQuietlyOnce_ThenRunsWithoutBuilding()
    {
        using var checkout = new ScratchCheckout();

        var first = await RunScriptAsync(checkout.Root, checkout.Environment(), "check", "deck.toml", "--json");
        var second = await RunScriptAsync(checkout.Root, checkout.Environment(), "--version");

        Assert.Equal(0, first.Code);
        Assert.Equal($"native {checkout.Program} check deck.toml --json\n", first.Out);
        var lines = first.Error.Split('\n', StringSplitOptions.RemoveEmptyEntries);
        Assert.Equal(2, lines.Length);
        Assert.StartsWith("ratedeck: building the program", lines[0], StringComparison.Ordinal);
        Assert.Equal("ratedeck: built; running", lines[1]);
        Assert.Equal(0, second.Code);
        Assert.Equal("", second.Error);
        Assert.Equal(1, checkout.Builds());
    }

    [Fact]
    public async Task SourceNewerThanTheProgram_Rebuilds()
    {
        using var checkout = new ScratchCheckout();
        var first = await RunScriptAsync(checkout.Root, checkout.Environment(), "--version");
        Assert.Equal(0, first.Code);

        File.SetLastWriteTimeUtc(checkout.Program, DateTime.UtcNow.AddHours(-1));
        var second = await RunScriptAsync(checkout.Root, checkout.Environment(), "--version");

        Assert.Equal(0, second.Code);
        Assert.StartsWith("ratedeck: building the program", second.Error, StringComparison.Ordinal);
        Assert.Equal(2, checkout.Builds());
    }

    [Fact]
    public async Task FailedBuild_ShowsTheBuildsMessages_AndRunsNothing()
    {
        using var checkout = new ScratchCheckout();
        const string error = "Verbs/CheckVerb.cs(3,1): error CS1002: ; expected";

        var run = await RunScriptAsync(checkout.Root, checkout.Environment(("FAKE_BUILD_ERROR", error)), "check", "deck.toml", "--json");

        Assert.Equal(1, run.Code);
        Assert.Equal("", run.Out);
        Assert.Contains(error, run.Error, StringComparison.Ordinal);
        Assert.Contains("ratedeck: the build failed", run.Error, StringComparison.Ordinal);
        Assert.False(File.Exists(checkout.Program));
    }

    [Fact]
    public async Task RunsStartedTogether_OnAFreshCheckout_BuildOnce()
    {
        using var checkout = new ScratchCheckout();
        var environment = checkout.Environment(("FAKE_BUILD_SECONDS", "1"));

        var runs = await Task.WhenAll(Enumerable.Range(0, 3).Select(_ => RunScriptAsync(checkout.Root, environment, "--version")));

        Assert.All(runs, run => Assert.Equal(0, run.Code));
        Assert.All(runs, run => Assert.Equal($"native {checkout.Program} --version\n", run.Out));
        Assert.Equal(1, checkout.Builds());
    }

    /// <summary>The signature of the READYTORUN_HEADER the CLI header points at, or null for an IL-only assembly.</summary>
    private static uint? ReadyToRunSignature(string assembly)
    {
        using var stream = File.OpenRead(assembly);
        using var reader = new PEReader(stream);
        var native = reader.PEHeaders.CorHeader!.ManagedNativeHeaderDirectory;
        if (native.Size == 0)
        {
            return null;
        }

        reader.PEHeaders.TryGetDirectoryOffset(native, out var offset);
        stream.Position = offset;
        var signature = new byte[4];
        stream.ReadExactly(signature);
        return BitConverter.ToUInt32(signature);
    }

    private static async Task<(int Code, string Out, string Error)> RunScriptAsync(string root, IReadOnlyDictionary<string, string>? environment, params string[] args)
    {
        var info = new ProcessStartInfo(Path.Combine(root, "ratedeck")) { RedirectStandardOutput = true, RedirectStandardError = true, WorkingDirectory = root };
        foreach (var arg in args)
        {
            info.ArgumentList.Add(arg);
        }

        foreach (var (name, value) in environment ?? new Dictionary<string, string>())
        {
            info.Environment[name] = value;
        }

        using var process = Process.Start(info)!;
        var stdout = process.StandardOutput.ReadToEndAsync();
        var stderr = process.StandardError.ReadToEndAsync();
        await process.WaitForExitAsync().WaitAsync(TimeSpan.FromMinutes(8));
        return (process.ExitCode, await stdout, await stderr);
    }

    /// <summary>
    /// A scratch folder laid out like the checkout as far as the script looks (the script, a CLI
    /// project, a source file), with a stand-in `dotnet` first on PATH: `dotnet publish` counts its
    /// calls and arguments, writes build chatter on both streams as msbuild does, waits
    /// FAKE_BUILD_SECONDS, then fails with FAKE_BUILD_ERROR or writes the program (a script that prints
    /// its own path and arguments for a native build, an assembly otherwise); any other call stands
    /// for running the assembly and prints its arguments. A stand-in `clang` is on PATH too, so that
    /// the script takes the native route unless told otherwise (RATEDECK_BUILD).
    /// </summary>
    private sealed class ScratchCheckout : IDisposable
    {
        private const string _fakeDotnet = """
            #!/usr/bin/env bash
            if [ "$1" = publish ]; then
                echo "$*" >> "$FAKE_BUILDS"
                echo "  Determining projects to restore..."
                echo "MSBUILD : message on stderr" >&2
                sleep "${FAKE_BUILD_SECONDS:-0}"
                if [ -n "${FAKE_BUILD_ERROR:-}" ]; then echo "$FAKE_BUILD_ERROR"; exit 1; fi
                native=no; case "$*" in *RateDeckNative=true*) native=yes ;; esac
                if [ $native = yes ] && [ -n "${FAKE_NATIVE_ERROR:-}" ]; then echo "$FAKE_NATIVE_ERROR"; exit 1; fi
                while [ "$1" != -o ]; do shift; done
                mkdir -p "$2"
                if [ $native = yes ]; then
                    printf '#!/bin/sh\necho "native $0 $*"\n' > "$2/ratedeck" && chmod +x "$2/ratedeck"
                else
                    echo program > "$2/ratedeck.dll"
                fi
                exit 0
            fi
            echo "program $*"

            """;

        public ScratchCheckout()
        {
            Root = Directory.CreateTempSubdirectory("ratedeck-wrapper-").FullName;
            File.Copy(Path.Combine(CliRunner.RepositoryRoot(), "ratedeck"), Path.Combine(Root, "ratedeck"));
            Directory.CreateDirectory(Path.Combine(Root, "solver", "RateDeck.Cli"));
            Directory.CreateDirectory(Path.Combine(Root, "fitter"));
            File.WriteAllText(Path.Combine(Root, "solver", "RateDeck.Cli", "RateDeck.Cli.csproj"), "<Project />\n");
            File.WriteAllText(Path.Combine(Root, "solver", "RateDeck.Cli", "Program.cs"), "// source\n");
            File.WriteAllText(Path.Combine(Root, "Directory.Build.props"), "<Project />\n");
            Directory.CreateDirectory(Path.Combine(Root, "fake-bin"));
            File.WriteAllText(Path.Combine(Root, "fake-bin", "dotnet"), _fakeDotnet.Replace("\r\n", "\n", StringComparison.Ordinal));
            File.WriteAllText(Path.Combine(Root, "fake-bin", "clang"), "#!/bin/sh\nexit 0\n");
            foreach (var script in new[] { Path.Combine(Root, "ratedeck"), Path.Combine(Root, "fake-bin", "dotnet"), Path.Combine(Root, "fake-bin", "clang") })
            {
                if (!OperatingSystem.IsWindows())
                {
                    File.SetUnixFileMode(script, UnixFileMode.UserRead | UnixFileMode.UserWrite | UnixFileMode.UserExecute);
                }
            }
        }

        public string Root { get; }

        public string Published => Path.Combine(Root, "solver", "RateDeck.Cli", "bin", "published");

        /// <summary>The program of a native build, which the script takes when clang is on PATH.</summary>
        public string Program => Path.Combine(Published, "ratedeck");

        public string BuildLog => Path.Combine(Root, "builds.txt");

        public Dictionary<string, string> Environment(params (string Name, string Value)[] extra)
        {
            var environment = new Dictionary<string, string>
            {
                ["PATH"] = $"{Path.Combine(Root, "fake-bin")}:{System.Environment.GetEnvironmentVariable("PATH")}",
                ["FAKE_BUILDS"] = BuildLog,
            };
            foreach (var (name, value) in extra)
            {
                environment[name] = value;
            }

            return environment;
        }

        public int Builds() => File.Exists(BuildLog) ? File.ReadAllLines(BuildLog).Length : 0;

        public void Dispose() => Directory.Delete(Root, recursive: true);
    }
}
