using System.Runtime.InteropServices;

namespace RateDeck.LinearAlgebra;

/// <summary>A shared library to try: LAPACK, and the BLAS to take dgemm_/dgemv_ from when LAPACK lacks them.</summary>
internal sealed record LibraryCandidate(string Lapack, string? Blas)
{
    /// <summary>The name shown in summaries.</summary>
    public string DisplayName => Blas is null ? Lapack : $"{Lapack} + {Blas}";
}

/// <summary>Outcome of a load: the imports, or null with the reason every candidate failed.</summary>
internal sealed record LapackLoadResult(LapackImports? Imports, string Reason);

/// <summary>Values of Fortran CHARACTER arguments, and the hidden length that goes with each (see <see cref="LapackImports"/>).</summary>
internal static class Fortran
{
    public const byte Lower = (byte)'L', Vectors = (byte)'V', NoVectors = (byte)'N', All = (byte)'A';
    public const byte NoTranspose = (byte)'N', Transpose = (byte)'T';

    /// <summary>The hidden length of a one-character CHARACTER argument, passed last, by value.</summary>
    public const nint CharLength = 1;
}

/// <summary>
/// The plain Fortran LAPACK/BLAS symbols, loaded at run time and called through unmanaged function pointers.
/// <para>
/// Calling convention (the reference Fortran ABI that gfortran and OpenBLAS export): every argument
/// by reference, 32-bit integers (LP64: Debian's libopenblas0 and liblapack3; the 64-bit-integer
/// builds are other files and are not tried), matrices column-major. Each CHARACTER
/// argument adds a hidden length argument at the end of the list, passed by value; gfortran 8 and
/// later declare it size_t, so it is passed as <see cref="nint"/> 1. A callee that does not read
/// the hidden lengths ignores them harmlessly under the x86-64 and AArch64 C calling conventions.
/// </para>
/// </summary>
internal sealed unsafe class LapackImports
{
    /// <summary>The libraries tried in order: OpenBLAS (LAPACK and BLAS in one file), then the system LAPACK with its BLAS.</summary>
    public static readonly IReadOnlyList<LibraryCandidate> SystemCandidates =
    [
        new("libopenblas.so.0", null),
        new("libopenblas.so", null),
        new("liblapack.so.3", "libblas.so.3"),
    ];

    private LapackImports(LibraryCandidate library, Func<string, nint> resolve, string? configuration)
    {
        Library = library;
        Configuration = configuration;
        Dsyevd = (delegate* unmanaged[Cdecl]<byte*, byte*, int*, double*, int*, double*, double*, int*, int*, int*, int*, nint, nint, void>)resolve("dsyevd_");
        Dsyevr = (delegate* unmanaged[Cdecl]<byte*, byte*, byte*, int*, double*, int*, double*, double*, int*, int*, double*, int*, double*, double*, int*, int*, double*, int*, int*, int*, int*, nint, nint, nint, void>)resolve("dsyevr_");
        Dgeev = (delegate* unmanaged[Cdecl]<byte*, byte*, int*, double*, int*, double*, double*, double*, int*, double*, int*, double*, int*, int*, nint, nint, void>)resolve("dgeev_");
        Dgesv = (delegate* unmanaged[Cdecl]<int*, int*, double*, int*, int*, double*, int*, int*, void>)resolve("dgesv_");
        Dgemm = (delegate* unmanaged[Cdecl]<byte*, byte*, int*, int*, int*, double*, double*, int*, double*, int*, double*, double*, int*, nint, nint, void>)resolve("dgemm_");
        Dgemv = (delegate* unmanaged[Cdecl]<byte*, int*, int*, double*, double*, int*, double*, int*, double*, double*, int*, nint, void>)resolve("dgemv_");
    }

    /// <summary>The library the symbols came from.</summary>
    public LibraryCandidate Library { get; }

    /// <summary>OpenBLAS's build description (openblas_get_config), or null for other libraries.</summary>
    public string? Configuration { get; }

    /// <summary>DSYEVD(JOBZ, UPLO, N, A, LDA, W, WORK, LWORK, IWORK, LIWORK, INFO): symmetric eigensolver, divide and conquer.</summary>
    public delegate* unmanaged[Cdecl]<byte*, byte*, int*, double*, int*, double*, double*, int*, int*, int*, int*, nint, nint, void> Dsyevd { get; }

    /// <summary>DSYEVR(JOBZ, RANGE, UPLO, N, A, LDA, VL, VU, IL, IU, ABSTOL, M, W, Z, LDZ, ISUPPZ, WORK, LWORK, IWORK, LIWORK, INFO): symmetric eigensolver, relatively robust representations.</summary>
    public delegate* unmanaged[Cdecl]<byte*, byte*, byte*, int*, double*, int*, double*, double*, int*, int*, double*, int*, double*, double*, int*, int*, double*, int*, int*, int*, int*, nint, nint, nint, void> Dsyevr { get; }

    /// <summary>DGEEV(JOBVL, JOBVR, N, A, LDA, WR, WI, VL, LDVL, VR, LDVR, WORK, LWORK, INFO): general eigensolver.</summary>
    public delegate* unmanaged[Cdecl]<byte*, byte*, int*, double*, int*, double*, double*, double*, int*, double*, int*, double*, int*, int*, nint, nint, void> Dgeev { get; }

    /// <summary>DGESV(N, NRHS, A, LDA, IPIV, B, LDB, INFO): LU with partial pivoting and solve.</summary>
    public delegate* unmanaged[Cdecl]<int*, int*, double*, int*, int*, double*, int*, int*, void> Dgesv { get; }

    /// <summary>DGEMM(TRANSA, TRANSB, M, N, K, ALPHA, A, LDA, B, LDB, BETA, C, LDC): C = alpha op(A) op(B) + beta C.</summary>
    public delegate* unmanaged[Cdecl]<byte*, byte*, int*, int*, int*, double*, double*, int*, double*, int*, double*, double*, int*, nint, nint, void> Dgemm { get; }

    /// <summary>DGEMV(TRANS, M, N, ALPHA, A, LDA, X, INCX, BETA, Y, INCY): y = alpha op(A) x + beta y.</summary>
    public delegate* unmanaged[Cdecl]<byte*, int*, int*, double*, double*, int*, double*, int*, double*, double*, int*, nint, void> Dgemv { get; }

    /// <summary>
    /// Loads the first candidate that opens and exports every symbol. The library stays loaded for
    /// the life of the process. Never throws: a failure is a reason naming each candidate's problem.
    /// </summary>
    public static LapackLoadResult Load(IReadOnlyList<LibraryCandidate> candidates)
    {
        var problems = new List<string>();
        foreach (var candidate in candidates)
        {
            var problem = TryLoad(candidate, out var imports);
            if (imports is not null)
            {
                return new LapackLoadResult(imports, $"{candidate.DisplayName} loaded");
            }

            problems.Add(problem);
        }

        return new LapackLoadResult(null, string.Join("; ", problems));
    }

    private static string TryLoad(LibraryCandidate candidate, out LapackImports? imports)
    {
        imports = null;
        if (!NativeLibrary.TryLoad(candidate.Lapack, out var lapack))
        {
            return $"native library {candidate.Lapack} not found";
        }

        var blas = nint.Zero;
        if (candidate.Blas is not null && !NativeLibrary.TryLoad(candidate.Blas, out blas))
        {
            NativeLibrary.Free(lapack);
            return $"native library {candidate.Blas} (BLAS for {candidate.Lapack}) not found";
        }

        string[] lapackSymbols = ["dsyevd_", "dsyevr_", "dgeev_", "dgesv_"];
        string[] blasSymbols = ["dgemm_", "dgemv_"];
        var found = new Dictionary<string, nint>();
        var missing = new List<string>();
        foreach (var symbol in lapackSymbols.Concat(blasSymbols))
        {
            var isBlas = blasSymbols.Contains(symbol);
            if (NativeLibrary.TryGetExport(lapack, symbol, out var address)
                || (isBlas && blas != nint.Zero && NativeLibrary.TryGetExport(blas, symbol, out address)))
            {
                found[symbol] = address;
            }
            else
            {
                missing.Add(symbol);
            }
        }

        if (missing.Count > 0)
        {
            NativeLibrary.Free(lapack);
            if (blas != nint.Zero)
            {
                NativeLibrary.Free(blas);
            }

            return $"native library {candidate.DisplayName} lacks {string.Join(", ", missing)}";
        }

        imports = new LapackImports(candidate, symbol => found[symbol], ReadConfiguration(lapack));
        return string.Empty;
    }

    private static string? ReadConfiguration(nint library)
    {
        if (!NativeLibrary.TryGetExport(library, "openblas_get_config", out var address))
        {
            return null;
        }

        var getConfig = (delegate* unmanaged[Cdecl]<byte*>)address;
        return Marshal.PtrToStringUTF8((nint)getConfig())?.Trim();
    }
}
