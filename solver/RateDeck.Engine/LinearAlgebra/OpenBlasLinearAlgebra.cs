using System.Diagnostics.CodeAnalysis;
using MathNet.Numerics.LinearAlgebra.Double;

namespace RateDeck.LinearAlgebra;

/// <summary>Which LAPACK driver computes the symmetric eigen-decomposition.</summary>
public enum SymmetricEigenDriver
{
    /// <summary>dsyevd_, divide and conquer: the faster of the two on this project's bench (see tests/bench).</summary>
    DivideAndConquer,

    /// <summary>dsyevr_, relatively robust representations (MRRR).</summary>
    RelativelyRobust,
}

/// <summary>
/// Dense linear algebra from the system's LAPACK/BLAS (OpenBLAS when present), loaded at run time.
/// Inputs are copied before LAPACK overwrites them; read-only BLAS arguments are passed in place.
/// Results follow the same conventions as <see cref="ManagedLinearAlgebra"/> and agree with it to rounding.
/// The library's own threading is left as configured by the environment (OPENBLAS_NUM_THREADS and the like).
/// </summary>
public sealed unsafe class OpenBlasLinearAlgebra : ILinearAlgebra
{
    private static readonly Lazy<(OpenBlasLinearAlgebra? Provider, string Reason)> _system =
        new(() => Create(LapackImports.Load(LapackImports.SystemCandidates)));

    private readonly LapackImports _lapack;

    private OpenBlasLinearAlgebra(LapackImports lapack, SymmetricEigenDriver driver)
    {
        _lapack = lapack;
        SymmetricDriver = driver;
    }

    /// <inheritdoc />
    public string Name => SymmetricDriver == SymmetricEigenDriver.DivideAndConquer
        ? $"native ({_lapack.Library.DisplayName})"
        : $"native ({_lapack.Library.DisplayName}, dsyevr)";

    /// <summary>The LAPACK driver behind <see cref="SymmetricEigen"/>.</summary>
    public SymmetricEigenDriver SymmetricDriver { get; }

    /// <summary>OpenBLAS's build description (e.g. version and CPU kernel), or null for another library.</summary>
    public string? LibraryConfiguration => _lapack.Configuration;

    /// <summary>
    /// The system's native provider: the first of libopenblas.so.0, libopenblas.so, liblapack.so.3
    /// (with libblas.so.3) that loads, exports every routine and passes <see cref="NativeSelfCheck"/> with both symmetric drivers.
    /// Loaded once per process. On failure <paramref name="reason"/> says why, in plain words.
    /// </summary>
    public static bool TryLoadSystem([NotNullWhen(true)] out OpenBlasLinearAlgebra? provider, out string reason)
    {
        (provider, reason) = _system.Value;
        return provider is not null;
    }

    /// <summary>The same library with another symmetric eigensolver driver.</summary>
    public OpenBlasLinearAlgebra WithSymmetricDriver(SymmetricEigenDriver driver) => new(_lapack, driver);

    /// <summary>Wraps a load result, running the self-check on a loaded library.</summary>
    internal static (OpenBlasLinearAlgebra? Provider, string Reason) Create(LapackLoadResult load)
    {
        if (load.Imports is null)
        {
            return (null, load.Reason);
        }

        var provider = new OpenBlasLinearAlgebra(load.Imports, SymmetricEigenDriver.DivideAndConquer);
        var failure = NativeSelfCheck.Run(provider) ?? NativeSelfCheck.Run(provider.WithSymmetricDriver(SymmetricEigenDriver.RelativelyRobust)) ?? NativeSelfCheck.RunBand(provider);
        if (failure is not null)
        {
            return (null, $"native library {load.Imports.Library.DisplayName} failed the self-check: {failure}");
        }

        var configuration = load.Imports.Configuration is null ? string.Empty : $" ({load.Imports.Configuration})";
        return (provider, $"native library {load.Imports.Library.DisplayName}{configuration} loaded and passed the self-check");
    }

    /// <inheritdoc />
    public SymmetricEigenDecomposition SymmetricEigen(DenseMatrix symmetric) => Decompose(symmetric, overwrite: false);

    /// <inheritdoc />
    /// <remarks>LAPACK works in the storage of <paramref name="symmetric"/> (with dsyevd_ it holds the eigenvectors afterwards and the result shares it).</remarks>
    public SymmetricEigenDecomposition SymmetricEigenOverwriting(DenseMatrix symmetric) => Decompose(symmetric, overwrite: true);

    private SymmetricEigenDecomposition Decompose(DenseMatrix symmetric, bool overwrite)
    {
        var n = RequireSquare(symmetric, nameof(symmetric));
        var values = new double[n];
        var a = overwrite ? symmetric.Values : (double[])symmetric.Values.Clone();
        var vectors = SymmetricDriver == SymmetricEigenDriver.DivideAndConquer
            ? SymmetricEigenDivideAndConquer(a, n, values)
            : SymmetricEigenRelativelyRobust(a, n, values);
        return new SymmetricEigenDecomposition(values, new DenseMatrix(n, n, vectors));
    }

    /// <inheritdoc />
    public GeneralEigenDecomposition GeneralEigen(DenseMatrix matrix)
    {
        int n = RequireSquare(matrix, nameof(matrix)), lda = n, ldvl = 1, ldvr = n, lwork = -1, info;
        var a = (double[])matrix.Values.Clone();
        double[] real = new double[n], imaginary = new double[n], right = new double[n * n];
        double unusedLeft = 0, query = 0;
        byte jobvl = Fortran.NoVectors, jobvr = Fortran.Vectors;
        fixed (double* pa = a, pwr = real, pwi = imaginary, pvr = right)
        {
            _lapack.Dgeev(&jobvl, &jobvr, &n, pa, &lda, pwr, pwi, &unusedLeft, &ldvl, pvr, &ldvr, &query, &lwork, &info, Fortran.CharLength, Fortran.CharLength);
            CheckInfo("dgeev_ (workspace query)", info);
            lwork = (int)query;
            var work = new double[lwork];
            fixed (double* pwork = work)
            {
                _lapack.Dgeev(&jobvl, &jobvr, &n, pa, &lda, pwr, pwi, &unusedLeft, &ldvl, pvr, &ldvr, pwork, &lwork, &info, Fortran.CharLength, Fortran.CharLength);
            }
        }

        CheckInfo("dgeev_", info, "the QR algorithm did not converge");
        return DecompositionConventions.FromPacked(real, imaginary, right, n);
    }

    /// <inheritdoc />
    public DenseMatrix Multiply(DenseMatrix a, DenseMatrix b, bool transposeA = false, bool transposeB = false)
    {
        int m = transposeA ? a.ColumnCount : a.RowCount, k = transposeA ? a.RowCount : a.ColumnCount;
        int kb = transposeB ? b.ColumnCount : b.RowCount, n = transposeB ? b.RowCount : b.ColumnCount;
        if (k != kb)
        {
            throw new ArgumentException($"cannot multiply: op(A) is {m} x {k} but op(B) is {kb} x {n}", nameof(b));
        }

        int lda = a.RowCount, ldb = b.RowCount, ldc = m;
        double alpha = 1, beta = 0;
        byte transa = transposeA ? Fortran.Transpose : Fortran.NoTranspose, transb = transposeB ? Fortran.Transpose : Fortran.NoTranspose;
        var c = new double[m * n];
        fixed (double* pa = a.Values, pb = b.Values, pc = c)
        {
            _lapack.Dgemm(&transa, &transb, &m, &n, &k, &alpha, pa, &lda, pb, &ldb, &beta, pc, &ldc, Fortran.CharLength, Fortran.CharLength);
        }

        return new DenseMatrix(m, n, c);
    }

    /// <inheritdoc />
    public double[] Multiply(DenseMatrix a, double[] x, bool transposeA = false)
    {
        int m = a.RowCount, n = a.ColumnCount, lda = m, inc = 1;
        var (inner, outer) = transposeA ? (m, n) : (n, m);
        if (x.Length != inner)
        {
            throw new ArgumentException($"cannot multiply: op(A) has {inner} columns but x has {x.Length} entries", nameof(x));
        }

        double alpha = 1, beta = 0;
        byte trans = transposeA ? Fortran.Transpose : Fortran.NoTranspose;
        var y = new double[outer];
        fixed (double* pa = a.Values, px = x, py = y)
        {
            _lapack.Dgemv(&trans, &m, &n, &alpha, pa, &lda, px, &inc, &beta, py, &inc, Fortran.CharLength);
        }

        return y;
    }

    /// <inheritdoc />
    public DenseMatrix Solve(DenseMatrix a, DenseMatrix b)
    {
        int n = RequireSquare(a, nameof(a)), nrhs = b.ColumnCount, lda = n, ldb = n, info;
        if (b.RowCount != n)
        {
            throw new ArgumentException($"cannot solve: A is {n} x {n} but B has {b.RowCount} rows", nameof(b));
        }

        var lu = (double[])a.Values.Clone();
        var x = (double[])b.Values.Clone();
        var pivots = new int[n];
        fixed (double* pa = lu, pb = x)
        fixed (int* pipiv = pivots)
        {
            _lapack.Dgesv(&n, &nrhs, pa, &lda, pipiv, pb, &ldb, &info);
        }

        if (info > 0)
        {
            throw new SingularMatrixException($"the matrix is singular: LU pivot {info} is exactly zero");
        }

        CheckInfo("dgesv_", info);
        var diagonal = new double[n];
        for (var i = 0; i < diagonal.Length; i++)
        {
            diagonal[i] = lu[i * (diagonal.Length + 1)];
        }

        DecompositionConventions.ThrowIfSingular(diagonal);
        return new DenseMatrix(n, nrhs, x);
    }

    /// <inheritdoc />
    /// <remarks>dsterf_ for a tridiagonal matrix, dsbev_ for a wider band.</remarks>
    public double[] SymmetricBandEigenvalues(SymmetricBand band, out string method)
    {
        ArgumentNullException.ThrowIfNull(band);
        method = band.Bandwidth <= 1 ? "dsterf_ (tridiagonal QL/QR)" : "dsbev_ (band to tridiagonal, then QL/QR)";
        return band.Bandwidth <= 1 ? TridiagonalEigenvalues(band.Diagonal(), band.SubDiagonal()) : BandEigenvalues(band);
    }

    /// <summary>
    /// All eigenvalues, ascending, of the symmetric tridiagonal matrix with the given diagonal
    /// (N) and off-diagonal (N - 1), by dsterf_: O(N^2) time, O(N) memory. Inputs are not modified.
    /// </summary>
    public double[] TridiagonalEigenvalues(double[] diagonal, double[] offDiagonal)
    {
        ArgumentNullException.ThrowIfNull(diagonal);
        ArgumentNullException.ThrowIfNull(offDiagonal);
        int n = diagonal.Length, info;
        if (offDiagonal.Length != Math.Max(n - 1, 0))
        {
            throw new ArgumentException($"a tridiagonal matrix of order {n} has {Math.Max(n - 1, 0)} off-diagonal entries, not {offDiagonal.Length}", nameof(offDiagonal));
        }

        var d = (double[])diagonal.Clone();
        var e = new double[Math.Max(n, 1)];
        offDiagonal.CopyTo(e, 0);
        fixed (double* pd = d, pe = e)
        {
            _lapack.Dsterf(&n, pd, pe, &info);
        }

        CheckInfo("dsterf_", info, "the QL/QR iteration did not converge");
        return d;
    }

    /// <summary>
    /// All eigenvalues, ascending, of a symmetric band matrix, by dsbev_ without vectors (reduction
    /// to tridiagonal form, O(N^2 b), then QL/QR, O(N^2)); O(N b) memory. The input is not modified.
    /// </summary>
    public double[] BandEigenvalues(SymmetricBand band)
    {
        ArgumentNullException.ThrowIfNull(band);
        int n = band.Count, kd = band.Bandwidth, ldab = kd + 1, ldz = 1, info;
        byte jobz = Fortran.NoVectors, uplo = Fortran.Lower;
        var ab = (double[])band.Lower.Clone();
        var values = new double[n];
        var work = new double[Math.Max(1, (3 * n) - 2)];
        var z = new double[1];
        fixed (double* pab = ab, pw = values, pz = z, pwork = work)
        {
            _lapack.Dsbev(&jobz, &uplo, &n, &kd, pab, &ldab, pw, pz, &ldz, pwork, &info, Fortran.CharLength, Fortran.CharLength);
        }

        CheckInfo("dsbev_", info, "the QL/QR iteration did not converge");
        return values;
    }

    /// <summary>dsyevd_ on <paramref name="a"/> (overwritten by the eigenvectors, which are returned).</summary>
    private double[] SymmetricEigenDivideAndConquer(double[] a, int order, double[] values)
    {
        int n = order, lda = n, lwork = -1, liwork = -1, iquery = 0, info;
        double query = 0;
        byte jobz = Fortran.Vectors, uplo = Fortran.Lower;
        fixed (double* pa = a, pw = values)
        {
            _lapack.Dsyevd(&jobz, &uplo, &n, pa, &lda, pw, &query, &lwork, &iquery, &liwork, &info, Fortran.CharLength, Fortran.CharLength);
            CheckInfo("dsyevd_ (workspace query)", info);
            (lwork, liwork, var work, var iwork) = Workspace(query, iquery);
            fixed (double* pwork = work)
            fixed (int* piwork = iwork)
            {
                _lapack.Dsyevd(&jobz, &uplo, &n, pa, &lda, pw, pwork, &lwork, piwork, &liwork, &info, Fortran.CharLength, Fortran.CharLength);
            }
        }

        CheckInfo("dsyevd_", info, "the divide-and-conquer iteration did not converge");
        return a;
    }

    /// <summary>dsyevr_ on <paramref name="a"/> (destroyed); returns the eigenvectors.</summary>
    private double[] SymmetricEigenRelativelyRobust(double[] a, int order, double[] values)
    {
        int n = order, lda = n, ldz = n, il = 0, iu = 0, found = 0, lwork = -1, liwork = -1, iquery = 0, info;

        // abstol = 0 lets LAPACK pick its default; the MRRR path computes to high relative accuracy regardless.
        double vl = 0, vu = 0, abstol = 0, query = 0;
        byte jobz = Fortran.Vectors, range = Fortran.All, uplo = Fortran.Lower;
        var z = new double[n * n];
        var support = new int[2 * n];
        fixed (double* pa = a, pw = values, pz = z)
        fixed (int* pisuppz = support)
        {
            _lapack.Dsyevr(&jobz, &range, &uplo, &n, pa, &lda, &vl, &vu, &il, &iu, &abstol, &found, pw, pz, &ldz, pisuppz, &query, &lwork, &iquery, &liwork, &info, Fortran.CharLength, Fortran.CharLength, Fortran.CharLength);
            CheckInfo("dsyevr_ (workspace query)", info);
            (lwork, liwork, var work, var iwork) = Workspace(query, iquery);
            fixed (double* pwork = work)
            fixed (int* piwork = iwork)
            {
                _lapack.Dsyevr(&jobz, &range, &uplo, &n, pa, &lda, &vl, &vu, &il, &iu, &abstol, &found, pw, pz, &ldz, pisuppz, pwork, &lwork, piwork, &liwork, &info, Fortran.CharLength, Fortran.CharLength, Fortran.CharLength);
            }
        }

        CheckInfo("dsyevr_", info, "the MRRR iteration failed internally");
        return z;
    }

    /// <summary>Allocates the workspace a LAPACK query (lwork = liwork = -1) asked for.</summary>
    private static (int Length, int IntegerLength, double[] Work, int[] IntegerWork) Workspace(double query, int integerQuery) =>
        ((int)query, integerQuery, new double[(int)query], new int[integerQuery]);

    private static int RequireSquare(DenseMatrix matrix, string parameter) => matrix.RowCount == matrix.ColumnCount
        ? matrix.RowCount
        : throw new ArgumentException($"the matrix must be square, not {matrix.RowCount} x {matrix.ColumnCount}", parameter);

    /// <summary>info &lt; 0 is an argument this class got wrong; info &gt; 0 is a numerical failure of the routine.</summary>
    private static void CheckInfo(string routine, int info, string failure = "it failed")
    {
        if (info < 0)
        {
            throw new InvalidOperationException($"{routine} rejected argument {-info}: a bug in the native provider");
        }

        if (info > 0)
        {
            throw new ArithmeticException($"{routine}: {failure} (info = {info})");
        }
    }
}
