-- Requests the paths listed in the file named by WRK_PATHS, each once, in order (one wrk thread),
-- then prints the percentiles like wrk-percentiles.lua.
local paths = {}
for line in io.lines(os.getenv('WRK_PATHS')) do paths[#paths + 1] = line end
local next_path = 0
local wrapped = 0

request = function()
  next_path = next_path + 1
  if next_path > #paths then next_path = 1; wrapped = wrapped + 1 end
  return wrk.format('GET', paths[next_path])
end

dofile(os.getenv('WRK_SUMMARY'))
