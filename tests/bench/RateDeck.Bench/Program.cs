Console.WriteLine("benchmarks arrive with the native linear-algebra work");
