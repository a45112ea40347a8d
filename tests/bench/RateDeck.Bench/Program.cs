using System.Globalization;
using RateDeck.Bench;

var size = args.Length > 1 ? int.Parse(args[1], CultureInfo.InvariantCulture) : 2000;
switch (args.FirstOrDefault())
{
    case "expressions":
        ExpressionBenchmark.Run(size);
        break;
    case "kernel-assembly":
        KernelAssemblyBenchmark.Run(size);
        break;
    default:
        Console.WriteLine("usage: RateDeck.Bench expressions|kernel-assembly [N]   (N defaults to 2000)");
        break;
}
