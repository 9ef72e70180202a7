-- Mixed load on GET /api/datasets: each request picks a person, a sort, an offset and, about one
-- time in three, a search term, at random (seeded, so runs repeat). Settings come from the
-- environment: LIST_TOKENS (comma-separated bearer tokens, '-' for signed out), LIST_SORTS,
-- LIST_TERMS (URL-encoded), LIST_SEARCH_EVERY (1 in N requests searches; 0 never), LIST_LIMIT,
-- LIST_MAX_OFFSET, LIST_SEARCH_MAX_OFFSET, LIST_SEED.
-- Answers say in their Server-Timing header whether they came from the list's cache and how long
-- the database took; the totals go to the file LIST_STATS. WRK_SUMMARY prints the percentiles.
local function split(s)
  local out = {}
  for part in string.gmatch(s or '', '[^,]+') do out[#out + 1] = part end
  return out
end

local tokens, sorts, terms
local limit, max_offset, search_max_offset, search_every
cached, fresh, searched, db_us = 0, 0, 0, 0

init = function(args)
  tokens = split(os.getenv('LIST_TOKENS'))
  sorts = split(os.getenv('LIST_SORTS'))
  terms = split(os.getenv('LIST_TERMS'))
  limit = os.getenv('LIST_LIMIT') or '50'
  max_offset = tonumber(os.getenv('LIST_MAX_OFFSET') or '5000')
  search_max_offset = tonumber(os.getenv('LIST_SEARCH_MAX_OFFSET') or '500')
  search_every = tonumber(os.getenv('LIST_SEARCH_EVERY') or '3')
  math.randomseed(tonumber(os.getenv('LIST_SEED') or '1'))
end

request = function()
  local token = tokens[math.random(#tokens)]
  local path = '/api/datasets?limit=' .. limit .. '&sort=' .. sorts[math.random(#sorts)]
  if search_every > 0 and math.random(search_every) == 1 then
    searched = searched + 1
    path = path .. '&q=' .. terms[math.random(#terms)] .. '&offset=' .. math.random(0, search_max_offset)
  else
    path = path .. '&offset=' .. math.random(0, max_offset)
  end
  local headers = {}
  if token ~= '-' then headers['Authorization'] = 'Bearer ' .. token end
  return wrk.format('GET', path, headers)
end

response = function(status, headers, body)
  if status >= 300 then
    _G['status_' .. status] = (_G['status_' .. status] or 0) + 1
  end
  local timing = headers['Server-Timing'] or headers['server-timing']
  if not timing then return end
  if string.find(timing, 'cache', 1, true) then
    cached = cached + 1
  else
    fresh = fresh + 1
    local dur = string.match(timing, 'dur=([%d%.]+)')
    if dur then db_us = db_us + tonumber(dur) * 1000 end
  end
end

local threads = {}
setup = function(thread) threads[#threads + 1] = thread end

dofile(os.getenv('WRK_SUMMARY'))
local print_summary = done
done = function(summary, latency, requests)
  print_summary(summary, latency, requests)
  local totals = { cached = 0, fresh = 0, searched = 0, db_us = 0 }
  for _, thread in ipairs(threads) do
    for key, _ in pairs(totals) do totals[key] = totals[key] + (thread:get(key) or 0) end
  end
  -- Answers other than 2xx, by status (a rate limit or an error would otherwise pass unseen).
  local refused = {}
  for _, status in ipairs({ 400, 401, 404, 429, 500, 503 }) do
    local n = 0
    for _, thread in ipairs(threads) do n = n + (thread:get('status_' .. status) or 0) end
    if n > 0 then refused[#refused + 1] = string.format('"%d":%d', status, n) end
  end
  local out = assert(io.open(os.getenv('LIST_STATS'), 'w'))
  out:write(string.format('{"cached":%d,"fresh":%d,"searched":%d,"dbUs":%d,"refused":{%s}}\n',
    totals.cached, totals.fresh, totals.searched, math.floor(totals.db_us),
    table.concat(refused, ',')))
  out:close()
end
