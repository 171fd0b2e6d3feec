{
  "target_defaults": {
    "include_dirs": ["<!(node -p \"require('node-addon-api').include_dir\")"],
    "defines": ["NAPI_VERSION=8", "NAPI_CPP_EXCEPTIONS", "NODE_ADDON_API_DISABLE_DEPRECATED"],
    "cflags!": ["-fno-exceptions"],
    "cflags_cc!": ["-fno-exceptions"],
    "cflags_cc": ["-std=c++17", "-fexceptions", "-O2"]
  },
  "targets": [
    {
      "target_name": "triskel_env",
      "sources": ["src/env.cc"]
    },
    {
      "target_name": "triskel_kernels",
      "sources": ["src/kernels.cc"],
      "libraries": ["-lopenblas", "-llapacke"]
    }
  ]
}
