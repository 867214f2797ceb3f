module m(a, y); input a; output y; assign y = ^{4096{{4096{{4096{a}}}}}}; endmodule
