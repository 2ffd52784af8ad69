{
  "targets": [
    {
      "target_name": "modeshelf_native",
      "sources": ["src/addon.cc", "src/dense.cc", "src/sparse.cc", "src/hammarling.cc"],
      "include_dirs": ["/usr/include/suitesparse"],
      "cflags_cc": ["-O3", "-std=c++17", "-fexceptions", "-fopenmp-simd", "-pthread"],
      "cflags_cc!": ["-fno-exceptions"],
      "libraries": [
        "-llapacke",
        "-lopenblas",
        "-lumfpack",
        "-lcholmod",
        "-lamd",
        "-lcolamd",
        "-lsuitesparseconfig",
        "-pthread"
      ]
    }
  ]
}
