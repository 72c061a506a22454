Console.WriteLine("pulseladder");
