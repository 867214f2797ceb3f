module a(x, y); input x; output y; assign y = x; endmodule
module b(x, y); input x; output y; assign y = ~x; endmodule
