// A tiny addon that reads and sets the PROCESS environment (getenv/setenv). In a worker thread,
// Node's process.env is a private copy that native libraries never see; OpenBLAS reads
// OPENBLAS_CORETYPE and OPENBLAS_NUM_THREADS from the real environment once, when it is loaded, so
// the loader sets them here before it loads the kernels addon (which links OpenBLAS).
#include <napi.h>

#include <cstdlib>
#include <string>

namespace {

Napi::Value GetEnv(const Napi::CallbackInfo& info) {
  if (!info[0].IsString()) throw Napi::TypeError::New(info.Env(), "getenv: expected a name");
  std::string name = info[0].As<Napi::String>().Utf8Value();
  const char* value = std::getenv(name.c_str());
  if (value == nullptr) return info.Env().Null();
  return Napi::String::New(info.Env(), value);
}

Napi::Value SetEnv(const Napi::CallbackInfo& info) {
  if (!info[0].IsString() || !info[1].IsString()) throw Napi::TypeError::New(info.Env(), "setenv: expected a name and a value");
  std::string name = info[0].As<Napi::String>().Utf8Value();
  std::string value = info[1].As<Napi::String>().Utf8Value();
  if (name.empty() || name.find('=') != std::string::npos) throw Napi::RangeError::New(info.Env(), "setenv: bad name");
  if (setenv(name.c_str(), value.c_str(), 1) != 0) throw Napi::Error::New(info.Env(), "setenv failed");
  return info.Env().Undefined();
}

Napi::Object Init(Napi::Env env, Napi::Object exports) {
  exports.Set("getenv", Napi::Function::New(env, GetEnv, "getenv"));
  exports.Set("setenv", Napi::Function::New(env, SetEnv, "setenv"));
  return exports;
}

}  // namespace

NODE_API_MODULE(triskel_env, Init)
