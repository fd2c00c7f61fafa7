-- Custom SQL migration file, put your code below! --
-- Parts of the library are searchable: every change to one queues it for the index.
CREATE TRIGGER parts_search AFTER INSERT OR UPDATE OR DELETE ON parts FOR EACH ROW EXECUTE FUNCTION search_enqueue('part', 'id');
