"""Claims about arithmetic functions: sigma_k(n), tau(n), r_s(n), p(n), sums over divisors
and convolution sums; their exact values and their generating functions."""
