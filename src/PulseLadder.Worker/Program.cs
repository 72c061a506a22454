Console.WriteLine("PulseLadder worker");
