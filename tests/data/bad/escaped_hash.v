module m(a, y);
  input a;
  output y;
  wire \w#1 ;
  assign y = a;
endmodule
