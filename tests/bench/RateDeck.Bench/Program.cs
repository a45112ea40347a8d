using RateDeck.Bench;

if (args is ["expressions", ..])
{
    ExpressionBenchmark.Run(args.Length > 1 ? int.Parse(args[1], System.Globalization.CultureInfo.InvariantCulture) : 2000);
    return;
}
Console.WriteLine("benchmarks arrive with the native linear-algebra work");
